import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { DEFAULT_EXTRACTION_SETTINGS, energyResolution_mV, fftLowpass, gaussianSmooth, savgolFilter, savgolWeights, smoothSpectrum } from "@/lib/spectra";

const golden = JSON.parse(readFileSync(new URL("./golden/scipy-smoothing.json", import.meta.url), "utf8"));

function expectClose(a: ArrayLike<number>, b: ArrayLike<number>, tol: number) {
  expect(a.length).toBe(b.length);
  let worst = 0;
  for (let i = 0; i < a.length; i++) worst = Math.max(worst, Math.abs(a[i] - b[i]));
  expect(worst).toBeLessThanOrEqual(tol);
}

describe("Savitzky–Golay weights against the published tables", () => {
  // Savitzky & Golay, Anal. Chem. 36, 1627 (1964), with the corrections of Steinier, Termonia &
  // Deltour, Anal. Chem. 44, 1906 (1972). Tolerance: 1e-13 (exact rationals in double precision).
  const smoothing: [number, number[], number][] = [
    [5, [-3, 12, 17, 12, -3], 35],
    [7, [-2, 3, 6, 7, 6, 3, -2], 21],
    [9, [-21, 14, 39, 54, 59, 54, 39, 14, -21], 231],
    [11, [-36, 9, 44, 69, 84, 89, 84, 69, 44, 9, -36], 429],
  ];
  for (const [w, num, den] of smoothing) {
    it(`quadratic and cubic smoothing, ${w} points`, () => {
      expectClose(savgolWeights(w, 2), num.map((v) => v / den), 1e-13);
      expectClose(savgolWeights(w, 3), num.map((v) => v / den), 1e-13);
    });
  }
  it("first derivative, quadratic, 5 and 7 points, divided by the step", () => {
    const h = 0.002;
    expectClose(savgolWeights(5, 2, 1, h), [-2, -1, 0, 1, 2].map((v) => v / 10 / h), 1e-9);
    expectClose(savgolWeights(7, 2, 1, h), [-3, -2, -1, 0, 1, 2, 3].map((v) => v / 28 / h), 1e-9);
  });
  it("first derivative, cubic, 5 points", () => {
    expectClose(savgolWeights(5, 3, 1), [1, -8, 0, 8, -1].map((v) => v / 12), 1e-13);
  });
});

describe("Savitzky–Golay polynomial exactness (property of least-squares polynomial filters)", () => {
  const n = 60;
  const h = 0.01;
  const x = Array.from({ length: n }, (_, i) => -0.3 + i * h);
  const p = (t: number) => 1.5 - 2 * t + 4 * t * t - 3 * t * t * t; // degree 3
  const dp = (t: number) => -2 + 8 * t - 9 * t * t;
  const d2p = (t: number) => 8 - 18 * t;
  const y = x.map(p);
  it("order 3 reproduces a cubic everywhere, ends included", () => {
    expectClose(savgolFilter(y, 11, 3), y, 1e-11);
  });
  it("order 3 gives its exact first and second derivative", () => {
    expectClose(savgolFilter(y, 9, 3, 1, h), x.map(dp), 1e-8);
    expectClose(savgolFilter(y, 9, 3, 2, h), x.map(d2p), 1e-6);
  });
  it("order 2 does not reproduce a cubic (the check can fail)", () => {
    const s = savgolFilter(y, 11, 2);
    const worst = Math.max(...s.map((v, i) => Math.abs(v - y[i])));
    expect(worst).toBeGreaterThan(1e-6);
  });
  it("rejects invalid windows with RangeError", () => {
    expect(() => savgolFilter(y, 10, 2)).toThrow(RangeError);
    expect(() => savgolFilter(y, 5, 5)).toThrow(RangeError);
    expect(() => savgolFilter(y.slice(0, 4), 5, 2)).toThrow(RangeError);
  });
});

describe(`Savitzky–Golay and Gaussian against ${golden.source}`, () => {
  for (const c of golden.savgol_coeffs) {
    it(`savgol_coeffs window ${c.window} order ${c.order} deriv ${c.deriv} delta ${c.delta}`, () => {
      expectClose(savgolWeights(c.window, c.order, c.deriv, c.delta), c.coeffs, 1e-10 * Math.max(1, ...c.coeffs.map(Math.abs)));
    });
  }
  for (const f of golden.savgol_filter) {
    it(`savgol_filter(mode="interp") window ${f.window} order ${f.order} deriv ${f.deriv}`, () => {
      const out = savgolFilter(golden.input.y, f.window, f.order, f.deriv, f.delta);
      const scale = Math.max(1, ...f.output.map(Math.abs));
      expectClose(out, f.output, 1e-9 * scale);
    });
  }
  for (const g of golden.gaussian_filter1d) {
    it(`gaussian_filter1d σ = ${g.sigma} points, mode reflect`, () => {
      expectClose(gaussianSmooth(golden.input.y, g.sigma), g.output, 1e-12);
    });
  }
});

describe("FFT low-pass with mirrored padding", () => {
  const n = 300;
  const slow = Array.from({ length: n }, (_, i) => Math.sin((2 * Math.PI * i) / 150));
  const fast = Array.from({ length: n }, (_, i) => 0.5 * Math.sin((2 * Math.PI * i) / 4));
  it("keeps a slow sine and removes a fast one (periods 150 and 4 points, cut-off 20)", () => {
    const out = fftLowpass(slow.map((v, i) => v + fast[i]), 20);
    // Interior (two cut-off periods from the ends) to 1e-3: mirroring puts a kink in the slope of a sine at
    // the ends, whose ringing decays within a few cut-off periods.
    let worst = 0;
    for (let i = 40; i < n - 40; i++) worst = Math.max(worst, Math.abs(out[i] - slow[i]));
    expect(worst).toBeLessThan(1e-3);
  });
  it("leaves a straight line free of edge ringing (mirroring avoids the wrap-around jump)", () => {
    const line = Array.from({ length: n }, (_, i) => 2 + 0.01 * i);
    const out = fftLowpass(line, 20);
    let worst = 0;
    for (let i = 0; i < n; i++) worst = Math.max(worst, Math.abs(out[i] - line[i]));
    expect(worst).toBeLessThan(0.02);
  });
  it("rejects a cut-off at or below the Nyquist period", () => {
    expect(() => fftLowpass(slow, 2)).toThrow(RangeError);
  });
});

describe("smoothing windows follow the spectrum's resolution (design: window defaults from the resolution)", () => {
  it("automatic Savitzky–Golay window = 1.5 × resolution, odd, at least 5 points", () => {
    const y = new Float64Array(400);
    const step = 0.001;
    for (const [T, vrms] of [[1.2, 1], [77, 8]]) {
      const res = energyResolution_mV(T, vrms);
      const sm = smoothSpectrum(y, step, res, DEFAULT_EXTRACTION_SETTINGS.smoothing);
      let w = Math.round((1.5 * res) / 1000 / step);
      if (w % 2 === 0) w += 1;
      expect(sm.windowPoints).toBe(Math.max(5, w));
    }
    // An explicit window in mV wins: 21 mV at 1 mV per point = 21 points.
    const sm = smoothSpectrum(y, step, 5, { ...DEFAULT_EXTRACTION_SETTINGS.smoothing, window_mV: 21 });
    expect(sm.windowPoints).toBe(21);
    // Noise gain of a 21-point quadratic filter is √c₀ with c₀ = 3(3m²+3m−1)/((2m−1)(2m+1)(2m+3)), m = 10
    // (Savitzky & Golay 1964: centre weight of the quadratic smoothing filter, 2m+1 points).
    const m = 10;
    const c0 = (3 * (3 * m * m + 3 * m - 1)) / ((2 * m - 1) * (2 * m + 1) * (2 * m + 3));
    expect(sm.gain).toBeCloseTo(Math.sqrt(c0), 12);
  });
});
