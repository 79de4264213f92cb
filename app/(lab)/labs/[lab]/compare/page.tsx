import type { Metadata } from "next";
import { ComparePlot } from "@/components/review/compare-plot";
import { EmptyState, PageHeader } from "@/components/ui/card";
import { pageCtx } from "@/lib/actions/validated";
import { listSamples } from "@/lib/services/samples/listSamples";

export const metadata: Metadata = { title: "Compare" };

export default async function ComparePage({ params }: { params: Promise<{ lab: string }> }) {
  const { lab } = await params;
  const ctx = await pageCtx(lab);
  const samples = await listSamples({ ctx });
  return (
    <>
      <PageHeader
        eyebrow={ctx.actor.labName}
        title="Compare"
        description={
          "Overlay the gap-versus-field plots of several samples, or of the regions and layers of one. " +
          "Fields are model estimates; compare samples measured with the same field model."
        }
      />
      {samples.length === 0 ? (
        <EmptyState title="No samples yet" />
      ) : (
        <ComparePlot
          lab={lab}
          samples={samples.map((s) => ({ id: s.id, name: s.name, spectraCount: s.spectraCount }))}
        />
      )}
    </>
  );
}
