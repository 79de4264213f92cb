/**
 * Our own JSON shape ("bandcross-spectra", version 1):
 *
 *   { "format": "bandcross-spectra", "version": 1,
 *     "meta": { …shared metadata… },
 *     "spectra": [ { "label": "…", "bias_V": [...], "didv": [...], "current_A": [...], "meta": { … } } ] }
 *
 * `bias_mV` may replace `bias_V`; `current_A` alone (without `didv`) asks for the derivative. A single
 * spectrum object (with `bias_V`/`didv` at the top level), or a bare array of spectrum objects, is
 * accepted too. Metadata values are numbers
 * or strings under canonical or unit-bearing keys, as in text files.
 */
import { z } from "zod";
import { ImportError, type SpectrumMeta } from "./types";
import { applyMetaPair, emptyMeta } from "./metadata";

export const numArray = z.array(z.union([z.number(), z.null()]));
export const metaSchema = z.record(z.string(), z.union([z.number(), z.string(), z.boolean(), z.null()]));
const spectrumSchema = z
  .object({
    label: z.string().optional(),
    bias_V: numArray.optional(),
    bias_mV: numArray.optional(),
    didv: numArray.optional(),
    current_A: numArray.optional(),
    meta: metaSchema.optional(),
  })
  .refine((s) => s.bias_V || s.bias_mV, { message: "needs bias_V or bias_mV" })
  .refine((s) => s.didv || s.current_A, { message: "needs didv or current_A" });
const fileSchema = z.object({
  format: z.literal("bandcross-spectra").optional(),
  version: z.literal(1).optional(),
  meta: metaSchema.optional(),
  spectra: z.array(spectrumSchema).min(1),
});

export interface JsonSpectrum {
  label: string;
  bias: Float64Array;
  didv: Float64Array | null;
  current: Float64Array | null;
  meta: SpectrumMeta;
  warnings: string[];
}

export const toArr = (a: (number | null)[] | undefined, f = 1): Float64Array | null => (a ? Float64Array.from(a, (v) => (v === null ? NaN : v * f)) : null);

type MetaRecord = z.infer<typeof metaSchema>;

/**
 * Parse the text as JSON of one of our shapes: a file object with `key` (an array of items), a bare
 * array of items, or a single item. Throws an ImportError naming the shape and the first problem.
 */
export function parseJsonShape<T extends z.ZodType>(text: string, schema: T, key: string, shape: string): z.infer<T> {
  let data: unknown;
  try {
    data = JSON.parse(text);
  } catch (e) {
    throw new ImportError(`invalid JSON: ${(e as Error).message}`);
  }
  const wrapped = Array.isArray(data) ? { [key]: data } : data && typeof data === "object" && !(key in data) ? { [key]: [data] } : data;
  const r = schema.safeParse(wrapped);
  if (!r.success) {
    const iss = r.error.issues[0];
    throw new ImportError(`JSON does not have the ${shape} shape: ${iss.path.join(".") || "(top)"}: ${iss.message}`);
  }
  return r.data;
}

/** The file's shared metadata overlaid with an item's own, as SpectrumMeta, with the warnings. */
export function metaOf(shared: MetaRecord | undefined, own: MetaRecord | undefined): { meta: SpectrumMeta; warnings: string[] } {
  const meta = emptyMeta();
  const warnings: string[] = [];
  for (const src of [shared, own])
    for (const [k, v] of Object.entries(src ?? {})) {
      if (v === null) continue;
      const w = applyMetaPair(meta, k, String(v));
      if (w) warnings.push(w);
    }
  return { meta, warnings };
}

export function parseJsonSpectra(text: string): JsonSpectrum[] {
  const data = parseJsonShape(text, fileSchema, "spectra", "bandcross-spectra");
  return data.spectra.map((s, i) => {
    const { meta, warnings } = metaOf(data.meta, s.meta);
    const bias = toArr(s.bias_V) ?? toArr(s.bias_mV, 1e-3)!;
    const didv = toArr(s.didv);
    const current = toArr(s.current_A);
    for (const [name, a] of [["didv", didv], ["current_A", current]] as const)
      if (a && a.length !== bias.length) throw new ImportError(`JSON spectra[${i}]: ${name} has ${a.length} values but the bias has ${bias.length}`);
    for (const [name, a] of [["bias", bias], ["didv", didv], ["current_A", current]] as const)
      if (a) for (let k = 0; k < a.length; k++) if (a[k] === Infinity || a[k] === -Infinity) throw new ImportError(`JSON spectra[${i}].${name}[${k}]: non-finite value`);
    return { label: s.label ?? `spectrum ${i + 1}`, bias, didv, current, meta, warnings };
  });
}
