/**
 * Positions of the spectra of a grid (or line) file, for the gap map. Two ways to give them:
 * - metadata `# grid: NX x NY` (columns in row-major order: x fastest), `# grid_step_nm: S` (or
 *   `grid_step_x_nm` / `grid_step_y_nm`) and optionally `# grid_origin_nm: X0, Y0`;
 * - column names that carry the position, e.g. `dI/dV x=1.5 y=0.25` (nm).
 * A spectrum that already has x_nm and y_nm keeps them.
 */
import type { ParsedSpectrum, SpectrumMeta } from "./types";

const POS_IN_NAME = /x\s*=\s*(-?\d+(?:\.\d+)?(?:e-?\d+)?)\D+?y\s*=\s*(-?\d+(?:\.\d+)?(?:e-?\d+)?)/i;

export function applyGridPositions(spectra: ParsedSpectrum[], fileMeta: SpectrumMeta): string[] {
  const warnings: string[] = [];
  const named = spectra.map((s) => POS_IN_NAME.exec(s.label));
  if (named.every((m) => m)) {
    spectra.forEach((s, i) => {
      if (s.meta.x_nm === undefined) s.meta.x_nm = Number(named[i]![1]);
      if (s.meta.y_nm === undefined) s.meta.y_nm = Number(named[i]![2]);
    });
    return warnings;
  }
  const grid = fileMeta.extra.grid;
  if (!grid) return warnings;
  const m = /^\s*(\d+)\s*[x×*,]\s*(\d+)\s*$/i.exec(grid);
  if (!m) return [`grid "${grid}" is not of the form NX x NY; no positions assigned`];
  const nx = Number(m[1]);
  const ny = Number(m[2]);
  if (nx * ny !== spectra.length) return [`grid ${nx} × ${ny} = ${nx * ny} positions but the file has ${spectra.length} spectra; no positions assigned`];
  const num = (v: string | undefined) => (v === undefined ? undefined : Number(v.replace(",", ".")));
  const step = num(fileMeta.extra.grid_step_nm);
  const sx = num(fileMeta.extra.grid_step_x_nm) ?? step;
  const sy = num(fileMeta.extra.grid_step_y_nm) ?? step;
  if (!(sx! > 0) || !(sy! > 0)) return ["grid without a positive grid_step_nm; no positions assigned"];
  const origin = (fileMeta.extra.grid_origin_nm ?? "0, 0").split(/[;,\s]+/).filter(Boolean).map(Number);
  const [x0, y0] = [origin[0] ?? 0, origin[1] ?? 0];
  spectra.forEach((s, i) => {
    if (s.meta.x_nm === undefined) s.meta.x_nm = x0 + (i % nx) * sx!;
    if (s.meta.y_nm === undefined) s.meta.y_nm = y0 + Math.floor(i / nx) * sy!;
  });
  return warnings;
}
