import { describe, expect, it } from "vitest";
import { estimateField, makeSpectrum, makeSweep, modelDidv, sweepGap_eV } from "@/lib/spectra";

describe("synthetic spectrum model", () => {
  it("inside the gap, far from both edges, dI/dV is the offset (zero density of states)", () => {
    const m = { vbEdge_V: -0.2, cbEdge_V: 0.2, T_K: 4.5, vrms_mV: 2, offset: 0.3 };
    const y = modelDidv([-0.05, 0, 0.05], m);
    for (const v of y) expect(v).toBeCloseTo(0.3, 9);
  });
  it("far outside, dI/dV = A·B(V)·|V − m| (massive Dirac DOS: step Δ/2 then linear rise)", () => {
    const m = { vbEdge_V: -0.1, cbEdge_V: 0.3, T_K: 1.2, vrms_mV: 1, amplitude: 10, background: { linear: 0.3, quadratic: 1 } };
    for (const v of [-0.4, 0.45, 0.6]) {
      const expected = 10 * (1 + 0.3 * v + v * v) * Math.abs(v - 0.1);
      expect(modelDidv([v], m)[0]).toBeCloseTo(expected, 9);
    }
  });
  it("at an edge the broadened step is half its height plus the kernel's mean |x|, symmetric kernel", () => {
    const m = { vbEdge_V: -0.2, cbEdge_V: 0.2, T_K: 0, vrms_mV: 0, amplitude: 1, background: { linear: 0, quadratic: 0 } };
    // Without broadening the value at the edge is half the step (the tables average the two sides).
    expect(modelDidv([0.2], m)[0]).toBeCloseTo(0.1, 4);
  });
  it("noise is seeded: the same seed gives the same spectrum, another seed another", () => {
    const a = makeSpectrum({ vbEdge_V: -0.1, cbEdge_V: 0.1, seed: 3 });
    const b = makeSpectrum({ vbEdge_V: -0.1, cbEdge_V: 0.1, seed: 3 });
    const c = makeSpectrum({ vbEdge_V: -0.1, cbEdge_V: 0.1, seed: 4 });
    expect(Array.from(a.didv)).toEqual(Array.from(b.didv));
    expect(a.didv[10]).not.toBe(c.didv[10]);
    expect(a.truth.gap_eV).toBeCloseTo(0.2, 12);
  });
  it("the current reaches the setpoint current at the setpoint bias", () => {
    const s = makeSpectrum({ vbEdge_V: -0.1, cbEdge_V: 0.1, meta: { setpoint_bias_V: 0.4, extra: {} }, setpointCurrent_A: 5e-11 });
    const i = Math.round((0.4 - s.bias_V[0]) / 0.002);
    expect(s.current_A[i]).toBeCloseTo(5e-11, 15);
  });
});

describe("synthetic field sweep", () => {
  it("fields come from the field model and gaps follow Δ = a·|E − E_c|", () => {
    const sw = makeSweep({ n: 6, seed: 2 });
    for (const s of sw.spectra) {
      expect(s.truthField.field_V_per_nm).toBeCloseTo(estimateField(sw.fieldModel, s.meta).field_V_per_nm, 12);
      expect(s.truthField.gap_eV).toBeCloseTo(1.1 * Math.abs(s.truthField.field_V_per_nm - 0.98), 12);
      expect(s.truth.gap_eV).toBeCloseTo(s.truthField.gap_eV, 12);
    }
    expect(sweepGap_eV(0.98, {})).toBe(0);
    expect(sweepGap_eV(1.08, { slopeRatio: 0.5 })).toBeCloseTo(0.055, 12);
  });
});
