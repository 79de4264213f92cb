import { describe, expect, it } from "vitest";
import { estimateField, fitCrossing, fitSweep, makeRng, makeSweep, pickGap, sweepGap_eV, type CrossingPoint } from "@/lib/spectra";

function vPoints(ec: number, a1: number, a2: number, fields: number[], sigma: number, seed: number): CrossingPoint[] {
  const rng = makeRng(seed);
  return fields.map((e) => {
    const g = e < ec ? a1 * (ec - e) : a2 * (e - ec);
    return { field_V_per_nm: e, fieldSigma_V_per_nm: 0, gap_eV: Math.abs(g + sigma * rng.normal()), gapSigma_eV: sigma };
  });
}
const grid = (a: number, b: number, n: number) => Array.from({ length: n }, (_, i) => a + ((b - a) * i) / (n - 1));

describe("V-shaped fit", () => {
  it("recovers an exact V (noise-free; least squares with an exactly known answer)", () => {
    const pts = vPoints(1.0, 1.1, 0.9, grid(0.8, 1.2, 21), 0, 1).map((p) => ({ ...p, gapSigma_eV: 1e-3 }));
    const c = fitCrossing(pts);
    expect(c.state).toBe("crossed");
    expect(c.field_V_per_nm!).toBeCloseTo(1.0, 6);
    expect(c.slopes!.below).toBeCloseTo(-1.1, 6);
    expect(c.slopes!.above).toBeCloseTo(0.9, 6);
    expect(c.comparison!.preferred).toBe("v-shape");
    expect(c.curve.field.length).toBe(101);
  });
  it("95% interval covers the true critical field in 95% of seeded noisy sweeps, not fewer, not more", () => {
    let hit = 0;
    const N = 400;
    for (let s = 0; s < N; s++) {
      const c = fitCrossing(vPoints(0.98, 1.1, 1.0, grid(0.85, 1.14, 20), 0.01, 300 + s));
      if (c.state === "crossed" && c.ci95_V_per_nm![0] <= 0.98 && 0.98 <= c.ci95_V_per_nm![1]) hit++;
    }
    // Central 99.9% band of Binomial(400, 0.95), from the exact binomial distribution (sums of
    // C(n,k)·p^k·(1−p)^(n−k)): 364 … 393 hits. Below it the interval is too narrow; above it too
    // wide (an interval 1.5× too wide would cover ≈ 99.7%, ≈ 399 of 400). 400 sweeps so that the
    // upper bound lies below N: with 120 it could not fail.
    expect(hit).toBeGreaterThanOrEqual(364);
    expect(hit).toBeLessThanOrEqual(393);
    // 400 fits take about 2 s alone and over 5 s beside a build on 2 cores.
  }, 60_000);
  it("uses the field error bars: a point with a large field σ on a steep branch weighs less", () => {
    const pts = vPoints(1.0, 1.0, 1.0, grid(0.8, 1.2, 21), 0.002, 7);
    pts[8] = { ...pts[8], gap_eV: pts[8].gap_eV + 0.03 }; // an outlier near the crossing
    const plain = fitCrossing(pts).field_V_per_nm!;
    pts[8] = { ...pts[8], fieldSigma_V_per_nm: 0.1 };
    const weighted = fitCrossing(pts).field_V_per_nm!;
    expect(Math.abs(plain - 1)).toBeGreaterThan(0.002);
    expect(Math.abs(weighted - 1)).toBeLessThan(Math.abs(plain - 1) / 3);
  });
});

describe("states", () => {
  it("a sweep whose gap only shrinks is never crossed (50 seeds), and says closing with the extrapolated field", () => {
    for (let s = 0; s < 50; s++) {
      const c = fitCrossing(vPoints(1.2, 1.0, 1.0, grid(0.8, 1.1, 15), 0.01, 500 + s));
      expect(c.state).not.toBe("crossed");
      expect(c.state).toBe("closing");
      expect(Math.abs(c.extrapolated_V_per_nm! - 1.2)).toBeLessThan(0.05);
    }
  });
  it("a gap that shrinks to zero and stays closed is not crossed", () => {
    const pts = grid(0.8, 1.2, 21).map((e) => ({ field_V_per_nm: e, fieldSigma_V_per_nm: 0, gap_eV: Math.max(0, 1.0 * (1.0 - e)), gapSigma_eV: 0.005 }));
    expect(fitCrossing(pts).state).not.toBe("crossed");
  });
  it("a constant gap is none", () => {
    const rng = makeRng(3);
    const pts = grid(0.8, 1.2, 15).map((e) => ({ field_V_per_nm: e, fieldSigma_V_per_nm: 0, gap_eV: 0.2 + 0.005 * rng.normal(), gapSigma_eV: 0.005 }));
    const c = fitCrossing(pts);
    expect(c.state).toBe("none");
    expect(c.found).toBe(false);
  });
  it("too few points is none with a reason", () => {
    const c = fitCrossing(vPoints(1, 1, 1, [0.9, 1.1, 1.2], 0.01, 1));
    expect(c.state).toBe("none");
    expect(c.reasons[0]).toMatch(/at least 4/);
  });
  it("the systematic field-scale uncertainty widens only the total interval", () => {
    const pts = vPoints(1.0, 1.1, 0.9, grid(0.85, 1.15, 20), 0.005, 11);
    const a = fitCrossing(pts);
    const b = fitCrossing(pts, { systematicFieldRelSigma: 0.05 });
    expect(b.ci95_V_per_nm).toEqual(a.ci95_V_per_nm);
    expect(b.ci95Total_V_per_nm![1] - b.ci95Total_V_per_nm![0]).toBeGreaterThan(2 * 1.96 * 0.05 * 0.99);
  });
  it("fitSweep treats the points' common field-model σ (5%) as that systematic scale, not as weights", () => {
    const pts = vPoints(1.0, 1.1, 0.9, grid(0.85, 1.15, 20), 0.005, 11);
    const withSigma = pts.map((p) => ({ ...p, fieldSigma_V_per_nm: 0.05 * p.field_V_per_nm }));
    const viaSweep = fitSweep(withSigma);
    const direct = fitCrossing(pts, { systematicFieldRelSigma: 0.05 });
    expect(viaSweep.field_V_per_nm).toBeCloseTo(direct.field_V_per_nm!, 12);
    expect(viaSweep.ci95Total_V_per_nm![0]).toBeCloseTo(direct.ci95Total_V_per_nm![0], 12);
    expect(viaSweep.ci95Total_V_per_nm![1]).toBeCloseTo(direct.ci95Total_V_per_nm![1], 12);
  });
});

describe("end to end on synthetic sweeps (spectra → picks → field → critical field)", () => {
  for (const seed of [21, 22]) {
    it(`critical field within 0.03 V/nm and inside the 95% interval (seed ${seed})`, () => {
      const sw = makeSweep({ seed, criticalField_V_per_nm: 0.99, slopeRatio: 0.85, midgapShift_V_per_V_per_nm: 0.04 });
      const pts = sw.spectra.map((s) => {
        const p = pickGap(s);
        const f = estimateField(sw.fieldModel, s.meta);
        return { field_V_per_nm: f.field_V_per_nm, fieldSigma_V_per_nm: 0, gap_eV: p.gap_eV!, gapSigma_eV: p.uncertainty_eV! };
      });
      const c = fitCrossing(pts);
      expect(c.state).toBe("crossed");
      expect(Math.abs(c.field_V_per_nm! - 0.99)).toBeLessThan(0.03);
      expect(c.ci95_V_per_nm![0]).toBeLessThanOrEqual(0.99);
      expect(c.ci95_V_per_nm![1]).toBeGreaterThanOrEqual(0.99);
    });
  }
  it("fact of the trade: a 300 meV gap closing at about 1 V/nm is crossed within ordinary setpoints (10 pA – 3 nA)", () => {
    // Zero-field gap 2λ = 0.3 eV closing at E_c = 1 V/nm → |dΔ/dE| = 0.3 eV per V/nm (= 2ℓe, ℓ = 1.5 Å).
    const model = { criticalField_V_per_nm: 1.0, slope_eV_per_V_per_nm: 0.3, currentMin_A: 1e-11, currentMax_A: 3e-9, seed: 5, noise: 0.01 };
    expect(sweepGap_eV(0, model)).toBeCloseTo(0.3, 12);
    const sw = makeSweep(model);
    const pts = sw.spectra.map((s) => {
      const p = pickGap(s);
      return { field_V_per_nm: estimateField(sw.fieldModel, s.meta).field_V_per_nm, fieldSigma_V_per_nm: 0, gap_eV: p.gap_eV!, gapSigma_eV: p.uncertainty_eV! };
    });
    const c = fitCrossing(pts);
    expect(c.state).toBe("crossed");
    expect(Math.abs(c.field_V_per_nm! - 1.0)).toBeLessThan(0.03);
  });
});
