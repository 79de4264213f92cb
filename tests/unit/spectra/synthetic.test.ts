import { describe, expect, it } from "vitest";
import { makeSpectrum, makeSweep, modelDidv, sweepGap_eV } from "@/lib/spectra";

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
  it("the first and last point of the default sweep carry the field worked out by hand", () => {
    // Default sweep: setpoint 0.6 V, currents 20 pA … 3 nA, φ_tip 4.7 eV, φ_sample 3.9 eV, d_c 0.25 nm,
    // no screening; E_c 0.98 V/nm, slope 1.1 eV per V/nm on both sides.
    // Worked independently of lib/spectra (CODATA 2018 exact e and h, m_e = 9.1093837015e-31 kg):
    //   G0 = 2e²/h = 7.7480917e-5 S; barrier (4.7 + 3.9)/2 = 4.3 eV; κ = √(2 m_e φ)/ħ = 10.6236 nm⁻¹
    //   (the textbook 0.5123·√φ Å⁻¹ gives 10.623 nm⁻¹);
    //   d = d_c + ln(G0 / (I/V)) / 2κ, E = (φ_tip − φ_sample)/d, Δ = 1.1·|E − 0.98|:
    //   20 pA: d = 0.93992 nm, E = 0.85113 V/nm, Δ = 0.14175 eV (below E_c)
    //   3 nA:  d = 0.70410 nm, E = 1.13620 V/nm, Δ = 0.17182 eV (above E_c)
    const sw = makeSweep({ n: 20, seed: 2 });
    const worked = [
      { s: sw.spectra[0], d: 0.93992, e: 0.85113, gap: 0.14175 },
      { s: sw.spectra[19], d: 0.7041, e: 1.1362, gap: 0.17182 },
    ];
    for (const { s, d, e, gap } of worked) {
      expect(s.truthField.distance_nm).toBeCloseTo(d, 4);
      expect(s.truthField.field_V_per_nm).toBeCloseTo(e, 4);
      expect(s.truthField.gap_eV).toBeCloseTo(gap, 4);
      // The spectrum drawn has that gap between its edges.
      expect(s.truth.gap_eV).toBeCloseTo(gap, 4);
    }
    expect(sw.spectra[0].meta.setpoint_current_A).toBeCloseTo(2e-11, 20);
    expect(sw.spectra[19].meta.setpoint_current_A).toBeCloseTo(3e-9, 18);
  });
  it("gaps follow Δ = a·|E − E_c| with the slope ratio above E_c", () => {
    expect(sweepGap_eV(0.98, {})).toBe(0);
    expect(sweepGap_eV(0.88, {})).toBeCloseTo(0.11, 12);
    expect(sweepGap_eV(1.08, { slopeRatio: 0.5 })).toBeCloseTo(0.055, 12);
  });
});
