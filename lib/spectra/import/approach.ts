/**
 * importApproachCurves: bytes of one uploaded file → I(z) approach curves, with the spectra's readers
 * and rules (decoding, metadata lines, units in the header, zip archives, limits; see index.ts).
 *
 * Text: a tip-height column (`z (pm)`, `z [nm]`, `z (Å)`, `height`; negative = closer, as
 * `z_offset_pm`) and one or more current columns (`current (pA)`, `I [nA]`), each one curve. A column
 * whose z goes forth and back holds the approach and the retraction (the fit splits them); so do two
 * columns named as an approach and a retraction (`I approach (pA)`, `I retract (pA)`: groupSweeps).
 * Rows are otherwise kept in their recorded order: z is neither sorted nor resampled.
 *
 * JSON ("bandcross-approach", version 1):
 *
 *   { "format": "bandcross-approach", "version": 1, "meta": { …shared metadata… },
 *     "curves": [ { "label": "…", "z_nm": [...] | "z_pm": [...], "current_A": [...], "meta": { … } } ] }
 *
 * A single curve object, or a bare array of them, is accepted too.
 */
import { z } from "zod";
import { resolveImportLimits } from "../settings";
import { decodeText } from "./decode";
import { headerRoles, parseDelimited, tableAxis } from "./delimited";
import { metaOf, metaSchema, numArray, parseJsonShape, toArr } from "./json";
import { isZip, readArchive } from "./zip";
import { ImportError, type ImportLimits, type SpectrumMeta } from "./types";

export interface ParsedCurve {
  /** File name (for a zip entry "archive.zip/entry.csv"). */
  file: string;
  /** Position of the curve within its file, from 0. */
  index: number;
  /** Column name, or "curve N". */
  label: string;
  /** Tip height, nm, negative = closer; recorded order. */
  z_nm: Float64Array;
  /** Current, A. */
  current_A: Float64Array;
  meta: SpectrumMeta;
  warnings: string[];
}

export interface ImportedCurveFile {
  file: string;
  status: "ok" | "error";
  message?: string;
  warnings: string[];
  curves: ParsedCurve[];
}

const lineList = (lines: number[]) =>
  lines.length <= 5 ? lines.join(", ") : `${lines.slice(0, 5).join(", ")} and ${lines.length - 5} more`;

/** Drop the rows where z or the current is missing (with a warning naming them); too few left is an error. */
function dropMissing(z: Float64Array, cur: Float64Array, lines: Int32Array | null, minPoints: number) {
  const keep: number[] = [];
  const dropped: number[] = [];
  for (let i = 0; i < z.length; i++) (Number.isNaN(z[i]) || Number.isNaN(cur[i]) ? dropped : keep).push(i);
  if (keep.length < minPoints)
    throw new ImportError(
      `only ${keep.length} usable point${keep.length === 1 ? "" : "s"}; a curve needs at least ${minPoints}`,
    );
  const where = dropped.map((i) => (lines ? lines[i] : i + 1));
  const warnings = dropped.length
    ? [
        `dropped ${dropped.length} row${dropped.length > 1 ? "s" : ""} with missing values (${lines ? "line" : "point"}${dropped.length > 1 ? "s" : ""} ${lineList(where)})`,
      ]
    : [];
  return { z: Float64Array.from(keep, (i) => z[i]), current: Float64Array.from(keep, (i) => cur[i]), warnings };
}

function fromText(file: string, text: string, limits: ImportLimits): ImportedCurveFile {
  const h = headerRoles(text);
  if (h && h.spectrum && !h.z)
    throw new ImportError("no z column, and columns named like a bias or dI/dV: a spectrum, not an I(z) curve");
  const t = parseDelimited(text, limits, "z");
  const zi = t.columns.findIndex((c) => c.role === "z");
  const curIdx = t.columns.map((c, i) => (c.role === "current" ? i : -1)).filter((i) => i >= 0);
  if (curIdx.length === 0) throw new ImportError("no current column besides z");
  const column = (ci: number) => {
    try {
      return dropMissing(t.values[zi], t.values[ci], t.lines, limits.minPoints);
    } catch (e) {
      if (e instanceof ImportError && curIdx.length > 1)
        throw new ImportError(`column ${ci + 1} ("${t.columns[ci].name}"): ${e.message}`);
      throw e;
    }
  };
  const curves = groupSweeps(curIdx.map((ci) => t.columns[ci].name)).map((g, index) => {
    const r = g.length === 1 ? column(curIdx[g[0]]) : forthAndBack(column(curIdx[g[0]]), column(curIdx[g[1]]));
    const names = g.map((k) => t.columns[curIdx[k]].name);
    return {
      file,
      index,
      label: names.join(" + ") || `curve ${index + 1}`,
      z_nm: r.z,
      current_A: r.current,
      meta: { ...t.meta, extra: { ...t.meta.extra } },
      warnings: g.length === 1 ? r.warnings : [...r.warnings, `columns "${names[0]}" and "${names[1]}" read as one curve, forth and back`],
    };
  });
  return { file, status: "ok", warnings: t.warnings, curves };
}

const APPROACH_NAME = /approach|forward|\bfwd\b/i;
const RETRACTION_NAME = /retract|backward|\bbwd\b/i;

/**
 * Current columns as curves: each alone, except that the i-th column named as an approach and the
 * i-th named as a retraction ("I approach (pA)", "I retract (pA)") make one curve, forth and back,
 * so that the fit compares the two (as for a column whose z goes forth and back). Positions in
 * `names`, in the order of the first column of each curve.
 */
export function groupSweeps(names: readonly string[]): number[][] {
  const ins = names.flatMap((n, k) => (APPROACH_NAME.test(n) && !RETRACTION_NAME.test(n) ? [k] : []));
  const outs = names.flatMap((n, k) => (RETRACTION_NAME.test(n) && !APPROACH_NAME.test(n) ? [k] : []));
  const partner = new Map<number, number>();
  for (let p = 0; p < Math.min(ins.length, outs.length); p++) partner.set(Math.min(ins[p], outs[p]), Math.max(ins[p], outs[p]));
  const taken = new Set(partner.values());
  const groups: number[][] = [];
  for (let k = 0; k < names.length; k++) {
    if (taken.has(k)) continue;
    const other = partner.get(k);
    if (other === undefined) groups.push([k]);
    else groups.push(APPROACH_NAME.test(names[k]) ? [k, other] : [other, k]);
  }
  return groups;
}

/**
 * One curve from an approach and a retraction read against the same z column: the approach from far
 * to near (larger z first), then the retraction back out, each in z order.
 */
function forthAndBack(a: ReturnType<typeof dropMissing>, r: ReturnType<typeof dropMissing>) {
  const inward = (z: Float64Array) => z.length < 2 || z[z.length - 1] <= z[0];
  const order = (n: number, forward: boolean) => Array.from({ length: n }, (_, k) => (forward ? k : n - 1 - k));
  const ia = order(a.z.length, inward(a.z));
  const ir = order(r.z.length, !inward(r.z));
  return {
    z: Float64Array.from([...ia.map((k) => a.z[k]), ...ir.map((k) => r.z[k])]),
    current: Float64Array.from([...ia.map((k) => a.current[k]), ...ir.map((k) => r.current[k])]),
    warnings: [...a.warnings, ...r.warnings],
  };
}

const curveSchema = z
  .object({
    label: z.string().optional(),
    z_nm: numArray.optional(),
    z_pm: numArray.optional(),
    current_A: numArray,
    meta: metaSchema.optional(),
  })
  .refine((c) => c.z_nm || c.z_pm, { message: "needs z_nm or z_pm" });
const fileSchema = z.object({
  format: z.literal("bandcross-approach").optional(),
  version: z.literal(1).optional(),
  meta: metaSchema.optional(),
  curves: z.array(curveSchema).min(1),
});

function fromJson(file: string, text: string, limits: ImportLimits): ImportedCurveFile {
  const data = parseJsonShape(text, fileSchema, "curves", "bandcross-approach");
  const curves = data.curves.map((c, index) => {
    const { meta, warnings } = metaOf(data.meta, c.meta);
    const zs = toArr(c.z_nm) ?? toArr(c.z_pm, 1e-3)!;
    const cur = toArr(c.current_A)!;
    if (cur.length !== zs.length)
      throw new ImportError(`JSON curves[${index}]: current_A has ${cur.length} values but z has ${zs.length}`);
    if (zs.length > limits.maxPoints)
      throw new ImportError(`curves[${index}]: ${zs.length} points exceed the limit of ${limits.maxPoints}`);
    for (const [name, a] of [
      ["z", zs],
      ["current_A", cur],
    ] as const)
      for (let k = 0; k < a.length; k++)
        if (a[k] === Infinity || a[k] === -Infinity)
          throw new ImportError(`JSON curves[${index}].${name}[${k}]: non-finite value`);
    let r;
    try {
      r = dropMissing(zs, cur, null, limits.minPoints);
    } catch (e) {
      if (e instanceof ImportError) throw new ImportError(`curves[${index}]: ${e.message}`);
      throw e;
    }
    return {
      file,
      index,
      label: c.label ?? `curve ${index + 1}`,
      z_nm: r.z,
      current_A: r.current,
      meta,
      warnings: [...warnings, ...r.warnings],
    };
  });
  return { file, status: "ok", warnings: [], curves };
}

const isJsonText = (file: string, text: string) => /\.json$/i.test(file) || /^\s*[[{]/.test(text);

function importOne(file: string, bytes: Uint8Array, limits: ImportLimits): ImportedCurveFile {
  try {
    if (bytes.length > limits.maxFileBytes)
      throw new ImportError(`file is ${bytes.length} bytes, over the limit of ${limits.maxFileBytes}`);
    const { text } = decodeText(bytes);
    return isJsonText(file, text) ? fromJson(file, text, limits) : fromText(file, text, limits);
  } catch (e) {
    const message =
      e instanceof ImportError ? e.message : `could not read the file: ${(e as Error)?.message ?? String(e)}`;
    return { file, status: "error", message, warnings: [], curves: [] };
  }
}

/**
 * Read one uploaded file (or archive) into I(z) curves.
 * @returns one entry per file (per zip entry for an archive); a whole-archive problem gives one error entry
 */
export function importApproachCurves(
  name: string,
  bytes: Uint8Array,
  limits?: Partial<ImportLimits>,
): ImportedCurveFile[] {
  const lim = resolveImportLimits(limits);
  if (!isZip(bytes) && !/\.zip$/i.test(name)) return [importOne(name, bytes, lim)];
  const fail = (file: string, message: string): ImportedCurveFile => ({
    file,
    status: "error",
    message,
    warnings: [],
    curves: [],
  });
  return readArchive(name, bytes, lim, (file, data) => importOne(file, data, lim), fail);
}

/**
 * What one file (not an archive) holds, from its start: "approach" for I(z) curves (a JSON of the
 * bandcross-approach shape, or a header with a tip-height column and no bias or dI/dV column),
 * "spectra" for everything else (including what cannot be read: the spectra's reader says why).
 */
export function fileKind(name: string, bytes: Uint8Array): "spectra" | "approach" {
  let text: string;
  try {
    text = decodeText(bytes.subarray(0, 65536)).text;
  } catch {
    return "spectra";
  }
  if (isJsonText(name, text))
    return /"(format)"\s*:\s*"bandcross-approach"|"z_(nm|pm)"\s*:/.test(text) ? "approach" : "spectra";
  return tableAxis(text) === "z" ? "approach" : "spectra";
}
