import { describe, expect, it } from "vitest";
import { columnsToCsv, importSpectra, makeSpectrum } from "@/lib/spectra";

/** Positions of grid spectra (our own convention, lib/spectra/import/grid.ts), checked on hand-countable grids. */
const base = makeSpectrum({ vbEdge_V: -0.1, cbEdge_V: 0.1, seed: 1 });
const cols = (n: number, label: (i: number) => string) => Array.from({ length: n }, (_, i) => ({ label: label(i), didv: base.didv }));
const read = (text: string) => importSpectra("grid.csv", new TextEncoder().encode(text))[0];

describe("grid positions", () => {
  it("assigns row-major positions from `# grid: NX x NY` and the step", () => {
    const f = read(columnsToCsv(base.bias_V, cols(6, (i) => `px${i}`), { extra: { grid: "3 x 2", grid_step_nm: "0.5", grid_origin_nm: "10, -2" } }));
    expect(f.status).toBe("ok");
    expect(f.spectra.map((s) => [s.meta.x_nm, s.meta.y_nm])).toEqual([
      [10, -2], [10.5, -2], [11, -2],
      [10, -1.5], [10.5, -1.5], [11, -1.5],
    ]);
  });

  it("reads positions from column names", () => {
    const f = read(columnsToCsv(base.bias_V, cols(3, (i) => `dIdV x=${i * 0.25} y=1.5`), {}));
    expect(f.spectra.map((s) => [s.meta.x_nm, s.meta.y_nm])).toEqual([[0, 1.5], [0.25, 1.5], [0.5, 1.5]]);
  });

  it("warns and assigns nothing when the grid does not match the number of spectra", () => {
    const f = read(columnsToCsv(base.bias_V, cols(5, (i) => `px${i}`), { extra: { grid: "3 x 2", grid_step_nm: "0.5" } }));
    expect(f.status).toBe("ok");
    expect(f.warnings.join(" ")).toContain("3 × 2 = 6 positions but the file has 5 spectra");
    expect(f.spectra.every((s) => s.meta.x_nm === undefined)).toBe(true);
  });
});
