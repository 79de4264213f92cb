import { describe, expect, it } from "vitest";
import { MAD_TO_SIGMA, linearLeastSquares, madSigma, makeRng, median, quantile } from "@/lib/spectra";

describe("linear least squares with exactly known answers", () => {
  it("a straight line through exact points is recovered to rounding", () => {
    const x = Float64Array.from({ length: 11 }, (_, i) => i / 10);
    const y = x.map((v) => 2 - 3 * v);
    const r = linearLeastSquares([new Float64Array(11).fill(1), x], y)!;
    expect(r.coef[0]).toBeCloseTo(2, 13);
    expect(r.coef[1]).toBeCloseTo(-3, 13);
    expect(r.rss).toBeLessThan(1e-25);
  });
  it("x = 0,1,2,3; y = 1,3,2,5 → slope = Sxy/Sxx = 5.5/5 = 1.1, intercept 2.75 − 1.1·1.5 = 1.1 (computed by hand)", () => {
    const r = linearLeastSquares([[1, 1, 1, 1], [0, 1, 2, 3]], [1, 3, 2, 5])!;
    expect(r.coef[1]).toBeCloseTo(1.1, 13);
    expect(r.coef[0]).toBeCloseTo(1.1, 13);
    // Residuals −0.1, 0.8, −1.3, 0.6 → RSS = 0.01 + 0.64 + 1.69 + 0.36 = 2.7; var(slope) = 1/Sxx = 0.2.
    expect(r.rss).toBeCloseTo(2.7, 12);
    expect(r.cov[3]).toBeCloseTo(0.2, 12);
  });
  it("weights: a weighted mean is Σwy/Σw with variance 1/Σw", () => {
    const r = linearLeastSquares([[1, 1, 1]], [1, 2, 4], [1, 1, 2])!;
    expect(r.coef[0]).toBeCloseTo(11 / 4, 13);
    expect(r.cov[0]).toBeCloseTo(1 / 4, 13);
  });
  it("a singular design returns null", () => {
    expect(linearLeastSquares([[1, 2, 3], [2, 4, 6]], [1, 2, 3])).toBeNull();
  });
});

describe("robust statistics", () => {
  it("MAD → σ factor 1/Φ⁻¹(3/4) = 1.482602 (standard result; Φ⁻¹(0.75) = 0.6744897502)", () => {
    expect(MAD_TO_SIGMA).toBeCloseTo(1 / 0.6744897501960817, 12);
  });
  it("MAD σ of seeded Gaussian noise is within 3% of σ for 20 000 samples (standard error ≈ 0.8%)", () => {
    const rng = makeRng(11);
    const x = Float64Array.from({ length: 20000 }, () => 0.7 * rng.normal() + 5);
    expect(Math.abs(madSigma(x) / 0.7 - 1)).toBeLessThan(0.03);
  });
  it("median and quantile follow numpy's defaults (linear interpolation, 'type 7')", () => {
    expect(median([3, 1, 2])).toBe(2);
    expect(median([4, 1, 3, 2])).toBe(2.5);
    // numpy.quantile([1, 2, 3, 4], 0.9) = 3.7; numpy.quantile([10, 0, 5], 0.25) = 2.5
    expect(quantile([1, 2, 3, 4], 0.9)).toBeCloseTo(3.7, 12);
    expect(quantile([10, 0, 5], 0.25)).toBeCloseTo(2.5, 12);
    expect(Number.isNaN(median([]))).toBe(true);
  });
});
