import { describe, expect, it } from "vitest";
import { countInBins, gapBins, gapHistogramFigure, gapSummary, MAX_BINS, nearestNice, niceStep } from "@/components/review/gap-histogram-figure";
import type { PhasePoint } from "@/components/review/phase-figure";

const point = (gap_meV: number, o: Partial<PhasePoint> = {}) =>
  ({ spectrumId: `s${gap_meV}`, field_V_per_nm: 0.9, gap_eV: gap_meV / 1000, gapSigma_eV: 0.002, excluded: false, excludedByFlag: false, flags: [], ...o }) as unknown as PhasePoint;

describe("niceStep and nearestNice", () => {
  it("round up, or to the nearest by ratio, to 1, 2 or 5 × 10^k", () => {
    expect([0.7, 1, 1.2, 2, 3.1, 5, 7, 12, 0.013].map(niceStep)).toEqual([1, 1, 2, 2, 5, 5, 10, 20, 0.02]);
    expect([59.5, 0.7, 1.4, 3.3, 7.4].map(nearestNice)).toEqual([50, 0.5, 1, 5, 10]);
  });
});

describe("gapBins", () => {
  it("are no finer than the gaps' median uncertainty, with edges on multiples of the width covering every gap", () => {
    // 16 gaps 80…230 meV (the browser test's grid), each ± 2 meV: FD width 2·IQR·16^(−1/3) ≈ 59.5 meV → 50.
    const gaps = Array.from({ length: 16 }, (_, k) => 80 + 10 * k);
    const bins = gapBins(gaps, gaps.map(() => 2))!;
    expect(bins.width).toBe(50);
    expect(bins.edges).toEqual([50, 100, 150, 200, 250]);
    expect(countInBins(gaps, bins)).toEqual([2, 5, 5, 4]);
  });

  it("widen to the uncertainty when that is the larger (a tight cluster of noisy picks)", () => {
    const gaps = [100, 100.5, 101, 101.2, 99.8, 100.1];
    const bins = gapBins(gaps, gaps.map(() => 4))!;
    expect(bins.width).toBe(5);
    expect(countInBins(gaps, bins).reduce((a, b) => a + b)).toBe(gaps.length);
  });

  it("never make more than MAX_BINS bins", () => {
    const gaps = [0, 1000, ...Array.from({ length: 200 }, (_, i) => 500 + i * 0.01)];
    const bins = gapBins(gaps, [])!;
    expect(bins.edges.length - 1).toBeLessThanOrEqual(MAX_BINS);
    expect(countInBins(gaps, bins).reduce((a, b) => a + b)).toBe(gaps.length);
  });

  it("one gap, or equal gaps, make one bin holding them", () => {
    const bins = gapBins([120, 120, 120], [null, null, null])!;
    expect(countInBins([120, 120, 120], bins)).toEqual([3]);
    expect(gapBins([], [])).toBeNull();
  });
});

describe("gapHistogramFigure", () => {
  const points = [point(100), point(110), point(120), point(300, { excluded: true })];

  it("counts the spectra in the fit and, when shown, those out of it, each once", () => {
    const counted = (show: boolean) =>
      gapHistogramFigure(points, show)
        .data.filter((t) => t.customdata)
        .map((t) => (t.customdata as [number, number, number][]).reduce((a, c) => a + c[2], 0));
    expect(counted(true)).toEqual([3, 1]);
    expect(counted(false)).toEqual([3]);
  });

  it("marks the median gap of the spectra in the fit", () => {
    const { layout } = gapHistogramFigure(points, true);
    expect((layout as unknown as { shapes: { x0: number }[] }).shapes[0].x0).toBe(110);
    expect(gapSummary(points)).toMatchObject({ n: 3, left: 1, median_meV: 110 });
  });
});
