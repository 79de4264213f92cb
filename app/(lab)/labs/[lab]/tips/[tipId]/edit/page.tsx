import { notFound } from "next/navigation";
import { EntityForm } from "@/components/forms/entity-form";
import { tipFields } from "@/components/forms/specs";
import { Card, PageHeader } from "@/components/ui/card";
import { orNotFound, pageCtx } from "@/lib/actions/validated";
import { can } from "@/lib/base/permissions";
import { getTip } from "@/lib/services/tips/getTip";
import { updateTipAction } from "../../../actions";

export default async function EditTipPage({ params }: { params: Promise<{ lab: string; tipId: string }> }) {
  const { lab, tipId } = await params;
  const ctx = await pageCtx(lab);
  if (!can(ctx.actor.role, "tip:write")) notFound();
  const t = await orNotFound(getTip({ ctx, input: { id: tipId } }));
  return (
    <>
      <PageHeader eyebrow="Tips" title={`Edit ${t.label}`} />
      <Card>
        <EntityForm
          action={updateTipAction.bind(null, lab, t.id)}
          schema="tip"
          submitLabel="Save changes"
          testId="tip-form"
          fields={tipFields({
            label: t.label,
            material: t.material,
            workFunction_eV: String(t.workFunctionEv),
            workFunctionSigma_eV: String(t.workFunctionSigmaEv),
            preparedOn: t.preparedOn ?? "",
            notes: t.notes ?? "",
          })}
        />
      </Card>
    </>
  );
}
