/**
 * bandcross barrier FILE... [--json]
 * Reads I(z) approach curves (text, JSON or zip), fits the decay constant κ (I ∝ exp(−2κz)) and the
 * apparent barrier height of each, prints a table or JSON.
 */
import { BarrierFitError, fitBarrier, importApproachCurves, type BarrierFit, type ParsedCurve } from "../../spectra";
import type { Command } from "../io";
import { CliUsageError } from "../io";
import { parse, readInputs, table } from "../shared";

const usage = `usage: bandcross barrier FILE... [--json]
  FILE    an I(z) curve file (csv/tsv/txt with a z column and current columns, JSON) or a zip of them;
          a directory is read recursively. z is the tip height, negative = closer to the sample
  --json  print {"curves":[…]} instead of a table
exit status: 0 when every file was read, 1 when any was rejected, 2 for a usage error`;

/** One curve's line of the JSON answer (the fields are a contract: add, never rename or drop). */
export interface CurveEntry {
  file: string;
  index: number | null;
  label: string | null;
  status: "ok" | "error";
  message: string | null;
  warnings: string[];
  /** κ, 1/nm, with I ∝ exp(−2κz). */
  kappa_per_nm: number | null;
  kappaSigma_per_nm: number | null;
  /** φ_ap = ħ²κ²/(2m_e), eV. */
  barrierHeight_eV: number | null;
  barrierHeightSigma_eV: number | null;
  pointsUsed: number | null;
  flags: { code: string; message: string }[];
  sweeps: {
    direction: string;
    kappa_per_nm: number;
    kappaSigma_per_nm: number;
    pointsUsed: number;
    range_nm: [number, number];
  }[];
}

const failed = (
  file: string,
  index: number | null,
  label: string | null,
  message: string,
  warnings: string[] = [],
): CurveEntry => ({
  file,
  index,
  label,
  status: "error",
  message,
  warnings,
  kappa_per_nm: null,
  kappaSigma_per_nm: null,
  barrierHeight_eV: null,
  barrierHeightSigma_eV: null,
  pointsUsed: null,
  flags: [],
  sweeps: [],
});

function entryOf(c: ParsedCurve, fileWarnings: string[]): CurveEntry {
  let f: BarrierFit;
  try {
    f = fitBarrier(c);
  } catch (e) {
    if (!(e instanceof BarrierFitError)) throw e;
    return failed(c.file, c.index, c.label, e.message, [...fileWarnings, ...c.warnings]);
  }
  return {
    file: c.file,
    index: c.index,
    label: c.label,
    status: "ok",
    message: null,
    warnings: [...fileWarnings, ...c.warnings, ...f.warnings],
    kappa_per_nm: f.kappa_per_nm,
    kappaSigma_per_nm: f.kappaSigma_per_nm,
    barrierHeight_eV: f.barrierHeight_eV,
    barrierHeightSigma_eV: f.barrierHeightSigma_eV,
    pointsUsed: f.pointsUsed,
    flags: f.flags.map((x) => ({ code: x.code, message: x.message })),
    sweeps: f.sweeps.map((s) => ({
      direction: s.direction,
      kappa_per_nm: s.kappa_per_nm,
      kappaSigma_per_nm: s.kappaSigma_per_nm,
      pointsUsed: s.pointsUsed,
      range_nm: s.range_nm,
    })),
  };
}

/** Read and fit every file; one entry per curve (or per rejected file). */
export function barrierFiles(paths: string[]): CurveEntry[] {
  const out: CurveEntry[] = [];
  for (const input of readInputs(paths)) {
    if ("error" in input) {
      out.push(failed(input.name, null, null, input.error));
      continue;
    }
    for (const f of importApproachCurves(input.name, input.bytes)) {
      if (f.status === "error") out.push(failed(f.file, null, null, f.message ?? "rejected"));
      else for (const c of f.curves) out.push(entryOf(c, f.warnings));
    }
  }
  return out;
}

const fixed = (v: number | null, d: number) => (v === null ? "—" : v.toFixed(d));

export const barrier: Command = {
  name: "barrier",
  summary: "decay constant κ and apparent barrier height from I(z) curves",
  usage,
  async run(argv, io) {
    const { values, positionals } = parse(argv, { json: { type: "boolean" }, help: { type: "boolean", short: "h" } });
    if (values.help) {
      io.out(usage + "\n");
      return 0;
    }
    if (positionals.length === 0) throw new CliUsageError("no files given");
    const curves = barrierFiles(positionals);
    if (values.json) io.out(JSON.stringify({ curves }, null, 2) + "\n");
    else {
      const rows = [["file", "#", "status", "κ (1/nm)", "φ_ap (eV)", "points", "note"]];
      for (const e of curves) {
        const kappa = e.kappa_per_nm === null ? "—" : `${fixed(e.kappa_per_nm, 2)} ± ${fixed(e.kappaSigma_per_nm, 2)}`;
        const phi =
          e.barrierHeight_eV === null ? "—" : `${fixed(e.barrierHeight_eV, 2)} ± ${fixed(e.barrierHeightSigma_eV, 2)}`;
        const note =
          e.status === "error" ? (e.message ?? "") : ([...e.flags.map((f) => f.message), ...e.warnings][0] ?? "");
        rows.push([
          e.file,
          e.index === null ? "—" : String(e.index),
          e.status,
          kappa,
          phi,
          e.pointsUsed === null ? "—" : String(e.pointsUsed),
          note,
        ]);
      }
      io.out(table(rows));
      const nErr = curves.filter((c) => c.status === "error").length;
      if (nErr) io.err(`${nErr} curve${nErr > 1 ? "s" : ""} or file${nErr > 1 ? "s" : ""} rejected\n`);
    }
    return curves.some((c) => c.status === "error") ? 1 : 0;
  },
};
