import { notFound } from "next/navigation";
import { EntityForm } from "@/components/forms/entity-form";
import { sampleFields } from "@/components/forms/specs";
import { Card, PageHeader } from "@/components/ui/card";
import { pageCtx, pageSample } from "@/lib/actions/validated";
import { can } from "@/lib/base/permissions";
import { updateSampleAction } from "../../../actions";

export default async function EditSamplePage({ params }: { params: Promise<{ lab: string; sampleId: string }> }) {
  const { lab, sampleId } = await params;
  const ctx = await pageCtx(lab);
  if (!can(ctx.actor.role, "sample:write")) notFound();
  const s = await pageSample(lab, sampleId);
  return (
    <>
      <PageHeader eyebrow={s.name} title="Edit sample" />
      <Card>
        <EntityForm
          action={updateSampleAction.bind(null, lab, s.id)}
          schema="sample"
          submitLabel="Save changes"
          testId="sample-form"
          fields={sampleFields({
            name: s.name,
            material: s.material,
            substrate: s.substrate ?? "",
            workFunction_eV: String(s.workFunctionEv),
            workFunctionSigma_eV: String(s.workFunctionSigmaEv),
            notes: s.notes ?? "",
          })}
        />
      </Card>
    </>
  );
}
