import { formatISO } from "date-fns";
import { notFound } from "next/navigation";
import { EntityForm } from "@/components/forms/entity-form";
import { sessionFields } from "@/components/forms/specs";
import { Card, PageHeader } from "@/components/ui/card";
import { SafetyNote } from "@/components/ui/safety";
import { pageCtx } from "@/lib/actions/validated";
import { can } from "@/lib/base/permissions";
import { listSamples } from "@/lib/services/samples/listSamples";
import { listTips } from "@/lib/services/tips/listTips";
import { createSessionAction } from "../../actions";

export default async function NewSessionPage({
  params,
  searchParams,
}: {
  params: Promise<{ lab: string }>;
  searchParams: Promise<{ sample?: string }>;
}) {
  const { lab } = await params;
  const { sample } = await searchParams;
  const ctx = await pageCtx(lab);
  if (!can(ctx.actor.role, "session:write")) notFound();
  const [samples, tips] = await Promise.all([listSamples({ ctx }), listTips({ ctx })]);
  return (
    <>
      <PageHeader
        eyebrow="Sessions"
        title="New session"
        description="A session groups the spectra of one cooldown with one tip."
      />
      <Card>
        <EntityForm
          action={createSessionAction.bind(null, lab)}
          schema="session"
          submitLabel="Create session"
          testId="session-form"
          fields={sessionFields({ samples, tips }, { sampleId: sample ?? "", date: formatISO(new Date(), { representation: "date" }) })}
        />
      </Card>
      <div className="mt-5">
        <SafetyNote topic="session" />
      </div>
    </>
  );
}
