import type { Metadata } from "next";
import { SpectrumReview } from "@/components/review/spectrum-review";
import { PageHeader } from "@/components/ui/card";
import { orNotFound, pageCtx } from "@/lib/actions/validated";
import { can } from "@/lib/base/permissions";
import { getSpectrum } from "@/lib/services/spectra/getSpectrum";

export const metadata: Metadata = { title: "Review" };

export default async function SpectrumPage({ params }: { params: Promise<{ lab: string; spectrumId: string }> }) {
  const { lab, spectrumId } = await params;
  const ctx = await pageCtx(lab);
  const s = await orNotFound(getSpectrum({ ctx, input: { id: spectrumId } }));
  return (
    <>
      <PageHeader
        eyebrow="Review"
        title={s.sampleName}
        description="Check each spectrum's band edges; correct, exclude or accept them."
      />
      <SpectrumReview lab={lab} initial={s} canEdit={can(ctx.actor.role, "analysis:write")} />
    </>
  );
}
