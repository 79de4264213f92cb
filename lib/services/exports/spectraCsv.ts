import "server-only";
import { and, asc, eq } from "drizzle-orm";
import { spectra } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import type { Ctx } from "@/lib/base/context";
import { getSample } from "../samples/getSample";
import { fileStem } from "@/lib/format";
import { csv } from "./csv";

/** The spectra themselves, long form: one row per bias point. */
export async function spectraCsv({ ctx, input }: { ctx: Ctx; input: { sampleId: string } }) {
  assertCan(ctx.actor, "lab:read");
  const sample = await getSample({ ctx, input: { id: input.sampleId } });
  const rows = await ctx.db
    .select({ id: spectra.id, file: spectra.sourceName, index: spectra.indexInFile, bias: spectra.biasV, didv: spectra.didv })
    .from(spectra)
    .where(and(eq(spectra.sampleId, sample.id), eq(spectra.labId, ctx.actor.labId)))
    .orderBy(asc(spectra.sourceName), asc(spectra.indexInFile));
  const body: (string | number)[][] = [];
  for (const r of rows) for (let i = 0; i < r.bias.length; i++) body.push([r.id, r.file, r.index, r.bias[i], r.didv[i]]);
  return { fileName: `${fileStem(sample.name)}-spectra.csv`, text: csv(["spectrum_id", "source_file", "index_in_file", "bias_V", "dIdV"], body) };
}
