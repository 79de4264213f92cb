/**
 * Writes spectra in Bandcross's delimited text form, the form the importer reads first: `# key: value`
 * metadata lines with the canonical keys, then a header row with units, then comma-separated rows
 * (bias in V). Used for demo data, test fixtures and exports.
 */
import type { SpectrumMeta } from "./import/types";

const META_KEYS = ["setpoint_bias_V", "setpoint_current_A", "z_offset_pm", "lockin_modulation_mV_rms", "temperature_K", "x_nm", "y_nm", "region"] as const;

function metaLines(meta: Partial<SpectrumMeta>): string[] {
  const lines: string[] = [];
  for (const k of META_KEYS) {
    const v = meta[k];
    if (v !== undefined && v !== null) lines.push(`# ${k}: ${v}`);
  }
  for (const [k, v] of Object.entries(meta.extra ?? {})) lines.push(`# ${k}: ${v}`);
  return lines;
}

/** One spectrum: `bias (V),dI/dV (a.u.)`. */
export function spectrumToCsv(s: { bias_V: ArrayLike<number>; didv: ArrayLike<number>; meta?: Partial<SpectrumMeta> }): string {
  const out = metaLines(s.meta ?? {});
  out.push("bias (V),dI/dV (a.u.)");
  for (let i = 0; i < s.bias_V.length; i++) out.push(`${s.bias_V[i]},${s.didv[i]}`);
  return out.join("\n") + "\n";
}

/** Several spectra sharing one bias axis (a line or a grid): one dI/dV column per spectrum. */
export function columnsToCsv(bias_V: ArrayLike<number>, columns: { label: string; didv: ArrayLike<number> }[], meta: Partial<SpectrumMeta> = {}): string {
  const out = metaLines(meta);
  out.push(["bias (V)", ...columns.map((c) => `${c.label} (a.u.)`)].join(","));
  const row: string[] = new Array(columns.length + 1);
  for (let i = 0; i < bias_V.length; i++) {
    row[0] = String(bias_V[i]);
    for (let j = 0; j < columns.length; j++) row[j + 1] = columns[j].didv[i].toPrecision(7);
    out.push(row.join(","));
  }
  return out.join("\n") + "\n";
}

/** An I(z) curve as text: z in pm (negative = closer), current in pA, with its metadata lines. */
export function approachToCsv(c: { z_nm: ArrayLike<number>; current_A: ArrayLike<number>; meta?: Partial<SpectrumMeta> }): string {
  const out = metaLines(c.meta ?? {});
  out.push("z (pm),current (pA)");
  for (let i = 0; i < c.z_nm.length; i++) out.push(`${(c.z_nm[i] * 1000).toFixed(3)},${(c.current_A[i] * 1e12).toPrecision(8)}`);
  return out.join("\n") + "\n";
}
