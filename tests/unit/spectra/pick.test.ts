import { describe, expect, it } from "vitest";
import { broadeningKernel, DEFAULT_EXTRACTION_SETTINGS, extractionSettingsSchema, makeRng, makeSpectrum, pickGap, quantile } from "@/lib/spectra";
import { fitEdges } from "@/lib/spectra/edges";

/** Varied spectra from the project's physical model (synthetic.ts); seeds 100+ are the tests' own. */
function varied(count: number, seed: number) {
  const rng = makeRng(seed);
  return Array.from({ length: count }, (_, k) => {
    const gap = 0.02 + rng.uniform() * 0.58;
    const mid = -0.15 + rng.uniform() * 0.3;
    const T = [1.2, 4.5, 77][Math.floor(rng.uniform() * 3)];
    const vrms = 1 + rng.uniform() * 7;
    const noise = 0.005 + rng.uniform() * 0.05;
    const step = [0.001, 0.002, 0.004][Math.floor(rng.uniform() * 3)];
    return makeSpectrum({ vbEdge_V: mid - gap / 2, cbEdge_V: mid + gap / 2, T_K: T, vrms_mV: vrms, noise, seed: seed * 1000 + k, step_V: step });
  });
}

describe("gap picking on synthetic spectra with known edges", () => {
  const set = varied(40, 101);
  const picks = set.map((s) => pickGap(s));
  it("every spectrum gives a gap", () => {
    expect(picks.every((p) => p.status === "ok")).toBe(true);
  });
  it("median |gap error| ≤ 3 meV and 90th percentile ≤ 10 meV (goals: ≤ 10 and ≤ 30, aim ≤ 3)", () => {
    const err = picks.map((p, i) => Math.abs(p.gap_eV! - set[i].truth.gap_eV) * 1000);
    expect(quantile(err, 0.5)).toBeLessThanOrEqual(3);
    expect(quantile(err, 0.9)).toBeLessThanOrEqual(10);
  });
  it("the broadening-aware fit beats the plain threshold (which is biased by the broadening)", () => {
    const fitErr = picks.map((p, i) => Math.abs(p.gap_eV! - set[i].truth.gap_eV));
    const thrErr = picks.map((p, i) => Math.abs(p.threshold_edges!.cbEdge_V - p.threshold_edges!.vbEdge_V - set[i].truth.gap_eV));
    expect(quantile(fitErr, 0.5)).toBeLessThan(quantile(thrErr, 0.5) / 3);
  });
  it("per-edge 95% intervals cover the true edges at least 90% of the time", () => {
    let hit = 0;
    picks.forEach((p, i) => {
      if (Math.abs(p.vbEdge_V! - set[i].truth.vbEdge_V) <= 1.96 * p.vbSigma_V!) hit++;
      if (Math.abs(p.cbEdge_V! - set[i].truth.cbEdge_V) <= 1.96 * p.cbSigma_V!) hit++;
    });
    expect(hit / (2 * picks.length)).toBeGreaterThanOrEqual(0.9);
  });
  it("reports the resolution from the metadata: √((3.5255 k_BT)² + (2.449 V_rms)²)", () => {
    const s = makeSpectrum({ vbEdge_V: -0.2, cbEdge_V: 0.2, T_K: 77, vrms_mV: 5, seed: 9 });
    expect(pickGap(s).resolution_meV).toBeCloseTo(Math.hypot(3.5255 * 8.617333262e-5 * 77 * 1000, 2.4495 * 5), 2);
  });
});

describe("noise floor", () => {
  it("floor and σ from median/MAD in the quiet region are close to the model's offset and noise", () => {
    const s = makeSpectrum({ vbEdge_V: -0.25, cbEdge_V: 0.25, noise: 0.03, offset: 0.2, seed: 41, step_V: 0.001 });
    const p = pickGap(s);
    // σ of a MAD estimate from ~400 points: relative standard error ≈ 1.17/√n ≈ 6%; allow 20%.
    expect(Math.abs(p.noiseSigma! / 0.03 - 1)).toBeLessThan(0.2);
    expect(Math.abs(p.noiseFloor! - 0.2)).toBeLessThan(0.01);
    expect(Math.abs(p.gap_eV! - 0.5)).toBeLessThan(0.005);
  });
});

describe("special cases", () => {
  it("a metallic spectrum (no quiet region) is no-gap", () => {
    const bias = Float64Array.from({ length: 301 }, (_, i) => -0.3 + i * 0.002);
    const rng = makeRng(5);
    const didv = bias.map((v) => 1 + 3 * v * v + 0.01 * rng.normal());
    const p = pickGap({ bias_V: bias, didv, meta: { temperature_K: 4.5, lockin_modulation_mV_rms: 2, extra: {} } });
    expect(p.status).toBe("no-gap");
    expect(p.gap_eV).toBeNull();
    expect(p.warnings.join()).toMatch(/metallic/);
  });
  it("a band edge outside the bias range gives no-gap with the side named", () => {
    const s = makeSpectrum({ vbEdge_V: -0.1, cbEdge_V: 0.6, biasMin_V: -0.4, biasMax_V: 0.4, seed: 2 });
    const p = pickGap(s);
    expect(p.status).toBe("no-gap");
    expect(p.warnings.join()).toMatch(/conduction-band side/);
  });
  it("a zero gap is reported as closed within resolution in ≥ 75% of 30 seeds, and where it is not, its 95% range still reaches zero", () => {
    // "Closed" needs evidence of a V-shaped minimum (design: a V without a flat floor is never read as
    // a gap); at this noise about one seed in five does not show its V clearly enough and is reported
    // as a small gap whose error bar reaches zero instead — honest either way.
    let closed = 0;
    for (let seed = 1; seed <= 30; seed++) {
      const p = pickGap(makeSpectrum({ vbEdge_V: 0.05, cbEdge_V: 0.05, T_K: 4.5, vrms_mV: 3, noise: 0.02, seed }));
      expect(p.status).toBe("ok");
      expect(p.gap_eV! - 1.96 * p.uncertainty_eV!).toBeLessThanOrEqual(1e-12);
      if (p.closed) closed++;
    }
    expect(closed / 30).toBeGreaterThanOrEqual(0.75);
  });
  it("a gap of 5× the resolution is not closed (30 seeds)", () => {
    for (let seed = 1; seed <= 30; seed++)
      expect(pickGap(makeSpectrum({ vbEdge_V: 0.03, cbEdge_V: 0.07, T_K: 4.5, vrms_mV: 3, noise: 0.02, seed })).closed).toBe(false);
  });
  it("descending input gives the same pick as ascending", () => {
    const s = makeSpectrum({ vbEdge_V: -0.12, cbEdge_V: 0.2, seed: 4 });
    const a = pickGap(s);
    const b = pickGap({ bias_V: Float64Array.from(s.bias_V).reverse(), didv: Float64Array.from(s.didv).reverse(), meta: s.meta });
    expect(b.gap_eV).toBeCloseTo(a.gap_eV!, 12);
  });
  it("threshold-only mode, log cross-check and other smoothings stay near the truth", () => {
    const s = makeSpectrum({ vbEdge_V: -0.15, cbEdge_V: 0.15, T_K: 4.5, vrms_mV: 2, noise: 0.01, seed: 8 });
    const thr = pickGap(s, { fit: { enabled: false } });
    expect(thr.method).toBe("threshold");
    // The threshold edge lies outside the true edge by about the resolution (≈ 5 mV here); allow 15 mV.
    expect(Math.abs(thr.gap_eV! - 0.3)).toBeLessThan(0.015);
    // The log-scale cross-check lands within a few resolutions (≈ 5 mV) of the edge.
    expect(Math.abs(thr.logCheck!.cbEdge_V! - 0.15)).toBeLessThan(0.02);
    expect(Math.abs(thr.logCheck!.vbEdge_V! + 0.15)).toBeLessThan(0.02);
    for (const method of ["gaussian", "fft", "none"] as const) {
      const p = pickGap(s, { smoothing: { method } });
      expect(Math.abs(p.gap_eV! - 0.3)).toBeLessThan(0.003);
    }
  });
  it("missing temperature and modulation use the assumed values, with warnings", () => {
    const s = makeSpectrum({ vbEdge_V: -0.15, cbEdge_V: 0.15, T_K: 4.5, vrms_mV: 0, seed: 8 });
    const p = pickGap({ bias_V: s.bias_V, didv: s.didv });
    expect(p.warnings.join()).toMatch(/assumed 4.5 K/);
    expect(Math.abs(p.gap_eV! - 0.3)).toBeLessThan(0.003);
  });
  it("rejects bad input with RangeError", () => {
    expect(() => pickGap({ bias_V: [1, 2, 3], didv: [1, 2, 3] })).toThrow(RangeError);
    expect(() => pickGap({ bias_V: new Float64Array(20).map((_, i) => i), didv: new Float64Array(20).fill(NaN) })).toThrow(/non-finite/);
  });
});

describe("extraction settings", () => {
  it("the defaults validate against the schema, and invalid values are refused", () => {
    expect(extractionSettingsSchema.parse(DEFAULT_EXTRACTION_SETTINGS)).toEqual(DEFAULT_EXTRACTION_SETTINGS);
    expect(extractionSettingsSchema.safeParse({ ...DEFAULT_EXTRACTION_SETTINGS, threshold: { k: -1, consecutive: 3 } }).success).toBe(false);
    expect(() => pickGap(makeSpectrum({ vbEdge_V: -0.1, cbEdge_V: 0.1 }), { smoothing: { order: 9 } })).toThrow();
  });
  it("text or a missing value where a number belongs is named as such, in every number of the settings", () => {
    const d = DEFAULT_EXTRACTION_SETTINGS;
    const cases = [
      { smoothing: { ...d.smoothing, order: "two" } },
      { smoothing: { ...d.smoothing, window_mV: "abc" } },
      { threshold: { ...d.threshold, consecutive: null } },
      { search: { minBias_V: "-0.5 V", maxBias_V: null } },
    ];
    for (const c of cases) {
      const r = extractionSettingsSchema.safeParse({ ...d, ...c });
      expect(r.success).toBe(false);
      expect(r.error!.issues.map((i) => i.message)).toEqual(["must be a number"]);
    }
  });
});

describe("polarity and sampling", () => {
  it("a mostly negative dI/dV (lock-in phase 180° off) is read with its sign inverted", () => {
    const s = makeSpectrum({ vbEdge_V: -0.1, cbEdge_V: 0.2, seed: 12 });
    const p = pickGap({ bias_V: s.bias_V, didv: s.didv.map((v) => -v), meta: s.meta });
    expect(p.warnings.join()).toMatch(/sign inverted/);
    expect(Math.abs(p.gap_eV! - 0.3)).toBeLessThan(0.003);
  });
  it("a non-uniform axis passed directly gets a warning", () => {
    const s = makeSpectrum({ vbEdge_V: -0.1, cbEdge_V: 0.2, seed: 12 });
    const b = Float64Array.from(s.bias_V, (v, i) => v + (i % 2) * 0.0005);
    expect(pickGap({ bias_V: b, didv: s.didv, meta: s.meta }).warnings.join()).toMatch(/non-uniform/);
  });
});

describe("spikes", () => {
  it("isolated single-point spikes of ±50σ inside the gap do not move the edges (was: gap 350 meV picked as 3 meV)", () => {
    const s = makeSpectrum({ vbEdge_V: -0.15, cbEdge_V: 0.2, noise: 0.02, seed: 5 });
    const y = Float64Array.from(s.didv);
    const i = Math.round((0.05 - s.bias_V[0]) / 0.002);
    y[i] += 1;
    y[i + 40] -= 1;
    const p = pickGap({ bias_V: s.bias_V, didv: y, meta: s.meta });
    expect(Math.abs(p.gap_eV! - 0.35)).toBeLessThan(0.003);
    expect(p.warnings.join()).toMatch(/2 single-point spikes replaced/);
  });
  it("a sharp band-edge step is not mistaken for a spike", () => {
    const s = makeSpectrum({ vbEdge_V: -0.15, cbEdge_V: 0.2, T_K: 1.2, vrms_mV: 1, noise: 0.005, step_V: 0.004, seed: 5 });
    const p = pickGap(s);
    expect(p.warnings.join()).not.toMatch(/spike/);
    expect(Math.abs(p.gap_eV! - 0.35)).toBeLessThan(0.002);
  });
});

describe("gaps near and below the resolution", () => {
  it("gaps of 0–12 meV (resolution ≈ 7.5 meV): the 95% range covers the truth in ≥ 85% of 40 seeded spectra", () => {
    let hit = 0;
    for (let k = 0; k < 40; k++) {
      const g = (k % 5) * 0.003;
      const s = makeSpectrum({ vbEdge_V: 0.02 - g / 2, cbEdge_V: 0.02 + g / 2, T_K: 4.5, vrms_mV: 3, noise: 0.02, seed: 2000 + k });
      const p = pickGap(s);
      if (Math.abs(p.gap_eV! - g) <= 1.96 * p.uncertainty_eV!) hit++;
    }
    expect(hit / 40).toBeGreaterThanOrEqual(0.85);
  });
});

describe("regressions", () => {
  it("a closed gap picked at zero keeps an honest error bar (was: 0.3 ± 1.2 meV for a true 9.7 meV gap)", () => {
    const p = pickGap(makeSpectrum({ vbEdge_V: 0.0151, cbEdge_V: 0.0248, T_K: 10, vrms_mV: 3.9, noise: 0.036, seed: 6 }));
    expect(p.closed).toBe(true);
    expect(Math.abs(p.gap_eV! - 0.0097)).toBeLessThanOrEqual(1.96 * p.uncertainty_eV!);
  });
  it("a wide gap with noise: the floor search starts generously, so a noise dip is not taken for the quiet region (was: gap 496 meV picked as 39 meV)", () => {
    const s = makeSpectrum({ vbEdge_V: -0.2482, cbEdge_V: 0.2482, T_K: 4.5, vrms_mV: 1.8, noise: 0.035, seed: 1117, step_V: 0.001 });
    expect(Math.abs(pickGap(s).gap_eV! - 0.4963)).toBeLessThan(0.005);
  });
  it("77 K: thermal tails put the threshold edge inside the gap; the fit searches far enough out (was: 293 meV picked as 270 meV)", () => {
    const s = makeSpectrum({ vbEdge_V: -0.0514, cbEdge_V: 0.2417, T_K: 77, vrms_mV: 2.1, noise: 0.006, seed: 1179, step_V: 0.001 });
    const p = pickGap(s);
    expect(Math.abs(p.gap_eV! - 0.2931)).toBeLessThan(0.003);
    expect(p.warnings.join()).not.toMatch(/search limit/);
  });
  it("smoothing 'none' still estimates the noise (was: σ = 0 and a threshold at the floor)", () => {
    const s = makeSpectrum({ vbEdge_V: -0.15, cbEdge_V: 0.15, noise: 0.01, seed: 8 });
    const p = pickGap(s, { smoothing: { method: "none" } });
    expect(p.noiseSigma!).toBeGreaterThan(0.008);
    expect(Math.abs(p.gap_eV! - 0.3)).toBeLessThan(0.003);
  });
  it("the zero-gap comparison model is not singular (was: two steps at one point collinear with the floor, Δχ² = ∞)", () => {
    const s = makeSpectrum({ vbEdge_V: 0.05, cbEdge_V: 0.05, T_K: 4.5, vrms_mV: 3, noise: 0.02, seed: 1 });
    const f = fitEdges({ bias: s.bias_V, y: s.didv, kernel: broadeningKernel(4.5, 3), vbGuess: 0.045, cbGuess: 0.055, sigma: 0.02, resolution_V: 0.0075, step_V: 0.002, bandWindow_V: 0.03, lo: 0, hi: s.bias_V.length - 1 });
    expect(f?.mode).toBe("joint");
    expect(Number.isFinite(f!.closedDeltaChi2)).toBe(true);
    // A true zero gap: below the simulated 99% point of Δχ² under a zero gap (pick.ts).
    expect(f!.closedDeltaChi2!).toBeLessThan(9.8);
  });
});
