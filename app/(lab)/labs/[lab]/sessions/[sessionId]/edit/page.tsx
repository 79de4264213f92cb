import { notFound } from "next/navigation";
import { EntityForm } from "@/components/forms/entity-form";
import { sessionFields } from "@/components/forms/specs";
import { Card, PageHeader } from "@/components/ui/card";
import { orNotFound, pageCtx } from "@/lib/actions/validated";
import { can } from "@/lib/base/permissions";
import { listSamples } from "@/lib/services/samples/listSamples";
import { getSession } from "@/lib/services/sessions/getSession";
import { listTips } from "@/lib/services/tips/listTips";
import { updateSessionAction } from "../../../actions";

export default async function EditSessionPage({ params }: { params: Promise<{ lab: string; sessionId: string }> }) {
  const { lab, sessionId } = await params;
  const ctx = await pageCtx(lab);
  if (!can(ctx.actor.role, "session:write")) notFound();
  const { session: s } = await orNotFound(getSession({ ctx, input: { id: sessionId } }));
  const [samples, tips] = await Promise.all([listSamples({ ctx }), listTips({ ctx })]);
  return (
    <>
      <PageHeader eyebrow="Sessions" title={`Edit ${s.label}`} />
      <Card>
        <EntityForm
          action={updateSessionAction.bind(null, lab, s.id)}
          schema="session"
          submitLabel="Save changes"
          testId="session-form"
          fields={sessionFields(
            { samples, tips },
            {
              label: s.label,
              date: s.date,
              sampleId: s.sampleId,
              tipId: s.tipId ?? "",
              instrument: s.instrument ?? "",
              temperature_K: s.temperatureK != null ? String(s.temperatureK) : "",
              notes: s.notes ?? "",
            },
          )}
        />
      </Card>
    </>
  );
}
