import type { Metadata } from "next";
import { ButtonLink } from "@/components/ui/button";
import { EmptyState, PageHeader } from "@/components/ui/card";
import { pageCtx } from "@/lib/actions/validated";
import { can } from "@/lib/base/permissions";
import { listSamples } from "@/lib/services/samples/listSamples";
import { SamplesTable } from "./samples-table";
import { LabStart } from "./lab-start";

export const metadata: Metadata = { title: "Samples" };

export default async function LabHome({ params }: { params: Promise<{ lab: string }> }) {
  const { lab } = await params;
  const ctx = await pageCtx(lab);
  const samples = await listSamples({ ctx });
  const canWrite = can(ctx.actor.role, "sample:write");
  return (
    <>
      <PageHeader
        eyebrow={ctx.actor.labName}
        title="Samples"
        description="Each sample's spectra, its latest band gap and where its gap closes under the tip's field."
        actions={canWrite ? <ButtonLink href={`/labs/${lab}/samples/new`}>New sample</ButtonLink> : null}
      />
      <LabStart ctx={ctx} lab={lab} />
      {samples.length === 0 ? (
        <EmptyState
          title="No samples yet"
          action={canWrite ? <ButtonLink href={`/labs/${lab}/samples/new`}>Add the first sample</ButtonLink> : null}
        >
          {canWrite
            ? "Add a sample with its work function, then create a session and upload its spectra."
            : "When your lab adds samples they will appear here."}
        </EmptyState>
      ) : (
        <SamplesTable lab={lab} samples={samples} />
      )}
    </>
  );
}
