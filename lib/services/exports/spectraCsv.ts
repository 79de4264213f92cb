import "server-only";
import { and, asc, eq } from "drizzle-orm";
import { spectra } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import type { Ctx } from "@/lib/base/context";
import { normaliseSpectrum, PrepareError } from "@/lib/spectra";
import { loadSampleAnalysis } from "../analysis/loadSampleAnalysis";
import { getSample } from "../samples/getSample";
import { fileStem } from "@/lib/format";
import { csv } from "./csv";

/**
 * The spectra themselves, long form: one row per bias point. Averages are spectra of their own
 * (`kind` average, with the standard error of the mean per point); `normalised` is each spectrum on
 * the view the sample's current settings pick on (`normalisation`: none, setpoint, or feenstra with its
 * I/V broadening and whether the current was rebuilt from dI/dV; empty values where a spectrum
 * cannot be normalised so, and the column says why).
 */
export async function spectraCsv({ ctx, input }: { ctx: Ctx; input: { sampleId: string } }) {
  assertCan(ctx.actor, "lab:read");
  const sample = await getSample({ ctx, input: { id: input.sampleId } });
  const { settings } = await loadSampleAnalysis({ ctx, input: { sampleId: sample.id } });
  const rows = await ctx.db
    .select({
      id: spectra.id,
      file: spectra.sourceName,
      index: spectra.indexInFile,
      bias: spectra.biasV,
      didv: spectra.didv,
      current: spectra.currentA,
      stderr: spectra.stderr,
      kind: spectra.kind,
      vset: spectra.setpointBiasV,
      iset: spectra.setpointCurrentA,
    })
    .from(spectra)
    .where(and(eq(spectra.sampleId, sample.id), eq(spectra.labId, ctx.actor.labId)))
    .orderBy(asc(spectra.sourceName), asc(spectra.indexInFile));
  const body: (string | number)[][] = [];
  for (const r of rows) {
    let values: Float64Array | null = null;
    let se: Float64Array | null = null;
    let words: string;
    try {
      const meta = { setpoint_bias_V: r.vset ?? undefined, setpoint_current_A: r.iset ?? undefined };
      const v = normaliseSpectrum({ bias_V: r.bias, didv: r.didv, current_A: r.current, stderr: r.stderr, meta }, settings.normalisation);
      values = v.values;
      se = v.stderr;
      words = v.method === "feenstra" ? `feenstra ${settings.normalisation.broadening_mV} mV${v.currentReconstructed ? " rebuilt current" : ""}` : v.method;
    } catch (e) {
      if (!(e instanceof PrepareError)) throw e;
      words = `not normalised: ${e.message}`;
    }
    for (let i = 0; i < r.bias.length; i++)
      body.push([r.id, r.file, r.index, r.bias[i], r.didv[i], r.kind, r.stderr ? r.stderr[i] : "", values ? values[i] : "", se ? se[i] : "", words]);
  }
  const head = ["spectrum_id", "source_file", "index_in_file", "bias_V", "dIdV", "kind", "dIdV_stderr", "normalised", "normalised_stderr", "normalisation"];
  return { fileName: `${fileStem(sample.name)}-spectra.csv`, text: csv(head, body) };
}
