import { notFound } from "next/navigation";
import { EntityForm } from "@/components/forms/entity-form";
import { tipFields } from "@/components/forms/specs";
import { Card, PageHeader } from "@/components/ui/card";
import { SafetyNote } from "@/components/ui/safety";
import { pageCtx } from "@/lib/actions/validated";
import { can } from "@/lib/base/permissions";
import { getLab } from "@/lib/services/labs/getLab";
import { createTipAction } from "../../actions";

export default async function NewTipPage({ params }: { params: Promise<{ lab: string }> }) {
  const { lab } = await params;
  const ctx = await pageCtx(lab);
  if (!can(ctx.actor.role, "tip:write")) notFound();
  const l = await getLab({ ctx });
  return (
    <>
      <PageHeader eyebrow="Tips" title="New tip" />
      <Card>
        <EntityForm
          action={createTipAction.bind(null, lab)}
          schema="tip"
          submitLabel="Create tip"
          testId="tip-form"
          fields={tipFields({
            workFunction_eV: String(l.defaultTipWorkFunctionEv),
            workFunctionSigma_eV: String(l.defaultTipWorkFunctionSigmaEv),
          })}
        />
      </Card>
      <div className="mt-5">
        <SafetyNote topic="tip" />
      </div>
    </>
  );
}
