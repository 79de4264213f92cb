import "server-only";
import { loadSampleAnalysis } from "../analysis/loadSampleAnalysis";
import type { Ctx } from "@/lib/base/context";
import { getPhase } from "../spectra/getPhase";
import { fileStem } from "@/lib/format";

export async function phaseJson({ ctx, input }: { ctx: Ctx; input: { sampleId: string } }) {
  const phase = await getPhase({ ctx, input: { ...input, precise: true } });
  const analysis = await loadSampleAnalysis({ ctx, input });
  return {
    fileName: `${fileStem(phase.sample.name)}-phase.json`,
    body: {
      sample: phase.sample,
      versions: { extractionSettings: analysis.settingsVersion, fieldModel: analysis.fieldVersion },
      extractionSettings: analysis.settings,
      fieldModel: analysis.fieldStored,
      points: phase.points,
      crossing: phase.crossing,
      exportedAt: new Date().toISOString(),
    },
  };
}
