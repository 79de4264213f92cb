import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import {
  averageSpectra,
  cumulativeTrapezoid,
  currentFromDidv,
  feenstraNormalise,
  makeRepeats,
  makeSpectrum,
  modelDidv,
  pickGap,
  PrepareError,
  setpointNormalise,
  type SpectrumModel,
} from "@/lib/spectra";

const golden = JSON.parse(readFileSync(new URL("./golden/scipy-prepare.json", import.meta.url), "utf8"));

const axis = (from: number, step: number, n: number) => Float64Array.from({ length: n }, (_, i) => from + i * step);
const worstRel = (a: ArrayLike<number>, b: ArrayLike<number>) => {
  let w = 0;
  for (let i = 0; i < a.length; i++) w = Math.max(w, Math.abs(a[i] - b[i]) / Math.max(1, Math.abs(b[i])));
  return w;
};
const rms = (a: Float64Array) => Math.sqrt(a.reduce((s, v) => s + v * v, 0) / a.length);

describe("cumulative trapezoid against scipy.integrate.cumulative_trapezoid (golden vectors, scipy version in the file)", () => {
  for (const c of golden.cumulative_trapezoid as { name: string; x: number[]; y: number[]; output: number[] }[])
    it(`${c.name} axis, ${c.x.length} points, to 1e-12 (double rounding of a running sum)`, () => {
      const out = cumulativeTrapezoid(c.y, c.x);
      expect(out).toHaveLength(c.output.length);
      expect(worstRel(out, c.output)).toBeLessThanOrEqual(1e-12);
    });
  it("the current rebuilt from dI/dV = a + bV is aV + bV²/2 with I(0) = 0 (trapezoid rule exact for linear functions)", () => {
    // An axis that does not hold 0 V: the zero lies between two points.
    const x = axis(-0.2013, 0.002, 250);
    const a = 3.2;
    const b = -5;
    const didv = Float64Array.from(x, (v) => a + b * v);
    const current = currentFromDidv(x, didv);
    let worst = 0;
    x.forEach((v, i) => (worst = Math.max(worst, Math.abs(current[i] - (a * v + (b * v * v) / 2)))));
    expect(worst).toBeLessThan(1e-12);
  });
  it("refuses to rebuild a current when the bias range does not reach 0 V", () => {
    const x = axis(0.05, 0.002, 100);
    expect(() => currentFromDidv(x, new Float64Array(100).fill(1))).toThrow(PrepareError);
    expect(() => currentFromDidv(x, new Float64Array(100).fill(1))).toThrow(/does not include 0 V/);
  });
});

describe("normalised conductance (Feenstra, Stroscio & Fein, Surf. Sci. 181, 295 (1987))", () => {
  const x = axis(-0.4, 0.002, 401);
  it("an ohmic junction, I = V/R, gives 1 everywhere (dI/dV = I/V = 1/R, Ohm's law), from a current column", () => {
    const R = 2.5e8;
    const current = Float64Array.from(x, (v) => v / R);
    // The lock-in's dI/dV in its own units (a.u.): any scale.
    const didv = new Float64Array(x.length).fill(7.3);
    const out = feenstraNormalise({ bias_V: x, didv, current_A: current }, 100);
    for (const v of out.values) expect(v).toBeCloseTo(1, 10);
    expect(out.currentReconstructed).toBe(false);
  });
  it("an ohmic junction gives 1 everywhere from the current rebuilt by integration, with the warning", () => {
    const out = feenstraNormalise({ bias_V: x, didv: new Float64Array(x.length).fill(0.04) }, 100);
    for (const v of out.values) expect(v).toBeCloseTo(1, 10);
    expect(out.currentReconstructed).toBe(true);
    expect(out.warnings.join(" ")).toMatch(/rebuilt by integrating dI\/dV/);
  });
  it("without broadening it is the logarithmic derivative d ln I/d ln V: 3 for I ∝ V³ (Feenstra et al. 1987)", () => {
    const xs = axis(-0.2995, 0.001, 600);
    const current = Float64Array.from(xs, (v) => 1e-9 * v ** 3);
    const didv = Float64Array.from(xs, (v) => 3e-9 * v * v);
    // ΔV = 0.01 mV against 1 mV steps: neighbours weigh e^-100, no broadening.
    const out = feenstraNormalise({ bias_V: xs, didv, current_A: current }, 0.01);
    // Central differences of V³ are exact up to h² terms: 3V² + h² against 3V², relative h²/(3V²) ≤ 1.4%
    // at the smallest |V| (0.5 mV); the scale fit spreads that over the curve, hence 2%.
    for (const v of out.values) expect(Math.abs(v - 3)).toBeLessThan(0.06);
  });
  it("the broadened I/V does not diverge inside a gap: finite, positive values everywhere", () => {
    const s = makeSpectrum({ vbEdge_V: -0.1, cbEdge_V: 0.15, noise: 0.02, seed: 5 });
    const out = feenstraNormalise({ bias_V: s.bias_V, didv: s.didv }, 100);
    expect(out.denominator.every((v) => Number.isFinite(v) && v > 0)).toBe(true);
    expect(out.values.every(Number.isFinite)).toBe(true);
  });
});

describe("band edges of a Feenstra-normalised model spectrum", () => {
  // The physical model's edges are known (synthetic.ts). Dividing by a smooth, positive broadened I/V
  // changes the floor and the bands' slopes, not where the onsets are (Feenstra 1994, from memory):
  // the normalised pick agrees with the truth within twice its own uncertainty, as the raw pick does.
  const cases: (SpectrumModel & { name: string })[] = [
    { name: "symmetric", vbEdge_V: -0.12, cbEdge_V: 0.16, noise: 0.02, seed: 11 },
    { name: "with a transmission term", vbEdge_V: -0.08, cbEdge_V: 0.2, noise: 0.02, seed: 12, transmission_V: 0.3 },
    { name: "weak valence onset", vbEdge_V: -0.15, cbEdge_V: 0.1, noise: 0.01, seed: 13, onsets: { vb: 0.4, cb: 1 } },
  ];
  for (const c of cases)
    it(c.name, () => {
      const s = makeSpectrum(c);
      const out = feenstraNormalise({ bias_V: s.bias_V, didv: s.didv }, 100);
      const p = pickGap({ bias_V: s.bias_V, didv: out.values, meta: s.meta });
      expect(p.status).toBe("ok");
      expect(Math.abs(p.vbEdge_V! - c.vbEdge_V)).toBeLessThanOrEqual(2 * p.vbSigma_V!);
      expect(Math.abs(p.cbEdge_V! - c.cbEdge_V)).toBeLessThanOrEqual(2 * p.cbSigma_V!);
    });
});

describe("setpoint normalisation", () => {
  it("an ohmic junction divided by I_set/V_set is 1 (Ohm's law)", () => {
    const R = 5e9;
    const out = setpointNormalise({ bias_V: [0, 1], didv: [1 / R, 1 / R], meta: { setpoint_bias_V: 0.5, setpoint_current_A: 0.5 / R } });
    for (const v of out.values) expect(v).toBeCloseTo(1, 12);
  });
  it("one junction at two tip heights overlays: at constant height the whole I(V) scales with I_set (exponential in distance)", () => {
    const x = axis(-0.3, 0.002, 301);
    const shape = (v: number) => Math.sinh(v / 0.1) + 0.3 * v;
    const dshape = (v: number) => Math.cosh(v / 0.1) / 0.1 + 0.3;
    const vset = 0.3;
    const curves = [2e-11, 8e-10].map((iset) =>
      setpointNormalise({
        bias_V: x,
        didv: Float64Array.from(x, (v) => (iset * dshape(v)) / shape(vset)),
        meta: { setpoint_bias_V: vset, setpoint_current_A: iset },
      }),
    );
    expect(worstRel(curves[0].values, curves[1].values)).toBeLessThan(1e-12);
  });
  it("refuses a spectrum without a setpoint", () => {
    expect(() => setpointNormalise({ bias_V: [0, 1], didv: [1, 1], meta: {} })).toThrow(/setpoint \(bias and current\) is not known/);
  });
});

describe("averaging repeats", () => {
  const model: SpectrumModel = { vbEdge_V: -0.12, cbEdge_V: 0.18, noise: 0.03, seed: 31 };
  const members = (reps: ReturnType<typeof makeRepeats>) => reps.map((r, k) => ({ ...r, label: `repeat ${k + 1}` }));
  it("N repeats with independent noise: the noise shrinks by √N (N = 4 and 16)", () => {
    // The residual's rms about the noise-free model estimates σ/√N from n = 501 points: its relative
    // standard error is 1/√(2n) = 3.2% (normal theory), so 4 standard errors (13%) bound a seeded draw.
    for (const N of [4, 16]) {
      const reps = makeRepeats(model, N);
      const avg = averageSpectra(members(reps));
      const clean = modelDidv(avg.bias_V, model);
      const residual = Float64Array.from(avg.didv, (v, i) => v - clean[i]);
      const n = avg.bias_V.length;
      const expected = 0.03 / Math.sqrt(N);
      expect(Math.abs(rms(residual) / expected - 1)).toBeLessThan(4 / Math.sqrt(2 * n));
      // The standard-error band: its rms estimates σ/√N from n(N − 1) degrees of freedom.
      expect(Math.abs(rms(avg.stderr) / expected - 1)).toBeLessThan(4 / Math.sqrt(2 * n * (N - 1)));
      expect(avg.averagedFrom).toHaveLength(N);
      expect(avg.leftOut).toHaveLength(0);
    }
  });
  it("noise alone leaves no repeat out (100 seeded sets of 4, white and correlated noise)", () => {
    let leftOut = 0;
    for (let s = 0; s < 50; s++)
      for (const noiseKind of ["white", "ar1"] as const)
        leftOut += averageSpectra(members(makeRepeats({ ...model, noiseKind, seed: 500 + s }, 4))).leftOut.length;
    expect(leftOut).toBe(0);
  });
  it("a tip change before the fourth repeat leaves it out with the reason, and the user can put it back", () => {
    const reps = members(makeRepeats(model, 4, { after: 3, edgeShift_V: 0.03, amplitudeFactor: 1.3 }));
    const avg = averageSpectra(reps);
    expect(avg.averagedFrom).toEqual([0, 1, 2]);
    expect(avg.leftOut.map((l) => l.index)).toEqual([3]);
    expect(avg.leftOut[0].statistic).toBeGreaterThan(avg.leftOut[0].limit);
    expect(avg.leftOut[0].reason).toMatch(/repeat 4 differs from the other repeats beyond their noise/);
    const back = averageSpectra(reps, { include: [3] });
    expect(back.averagedFrom).toEqual([0, 1, 2, 3]);
    expect(back.leftOut).toHaveLength(0);
  });
  it("a small tip change (5 mV, 3% amplitude) at 0.03 noise is detected too (the test can fail in both directions)", () => {
    const reps = members(makeRepeats(model, 4, { after: 3, edgeShift_V: 0.005, amplitudeFactor: 1.03 }));
    expect(averageSpectra(reps).leftOut.map((l) => l.index)).toEqual([3]);
  });
  it("axes that differ only by sampling are put on a common axis, with a warning", () => {
    const a = makeSpectrum({ ...model, step_V: 0.002 });
    const b = makeSpectrum({ ...model, step_V: 0.004, seed: 32 });
    const avg = averageSpectra([a, b]);
    expect(avg.warnings.join(" ")).toMatch(/put on a common axis .* in steps of 4\.0 mV/);
    expect(avg.bias_V[1] - avg.bias_V[0]).toBeCloseTo(0.004, 12);
  });
  it("refuses different bias ranges, setpoints and positions with the reason", () => {
    const a = makeSpectrum(model);
    const b = makeSpectrum({ ...model, biasMin_V: -0.3, biasMax_V: 0.3, meta: { setpoint_bias_V: 0.5, extra: {} } });
    expect(() => averageSpectra([a, b])).toThrow(/different bias ranges: spectrum 1 spans -500\.0 mV to 500\.0 mV/);
    const c = makeSpectrum({ ...model, meta: { setpoint_bias_V: 0.5, setpoint_current_A: 2e-10, extra: {} } });
    const d = makeSpectrum({ ...model, meta: { setpoint_bias_V: 0.5, setpoint_current_A: 1e-10, extra: {} } });
    expect(() => averageSpectra([c, d])).toThrow(/different setpoints: setpoint current 200\.0 pA .* differ by 50\.0%/);
    const e = makeSpectrum({ ...model, meta: { x_nm: 1, y_nm: 1, extra: {} } });
    const f = makeSpectrum({ ...model, meta: { x_nm: 1.5, y_nm: 1, extra: {} } });
    expect(() => averageSpectra([e, f])).toThrow(/different positions: .* 0\.50 nm apart/);
    expect(() => averageSpectra([a])).toThrow(/two spectra or more/);
  });
});
