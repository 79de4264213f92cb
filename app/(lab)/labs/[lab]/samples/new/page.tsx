import { notFound } from "next/navigation";
import { EntityForm } from "@/components/forms/entity-form";
import { sampleFields } from "@/components/forms/specs";
import { Card, PageHeader } from "@/components/ui/card";
import { pageCtx } from "@/lib/actions/validated";
import { can } from "@/lib/base/permissions";
import { getLab } from "@/lib/services/labs/getLab";
import { createSampleAction } from "../../actions";

export default async function NewSamplePage({ params }: { params: Promise<{ lab: string }> }) {
  const { lab } = await params;
  const ctx = await pageCtx(lab);
  if (!can(ctx.actor.role, "sample:write")) notFound();
  const labRow = await getLab({ ctx });
  return (
    <>
      <PageHeader
        eyebrow="Samples"
        title="New sample"
        description="The work function and its uncertainty feed the field estimate of every spectrum of this sample."
      />
      <Card>
        <EntityForm
          action={createSampleAction.bind(null, lab)}
          schema="sample"
          submitLabel="Create sample"
          testId="sample-form"
          fields={sampleFields({
            workFunction_eV: String(labRow.defaultSampleWorkFunctionEv),
            workFunctionSigma_eV: String(labRow.defaultSampleWorkFunctionSigmaEv),
          })}
        />
      </Card>
    </>
  );
}
