import { describe, expect, it } from "vitest";
import {
  BOLTZMANN_EV_PER_K,
  CONDUCTANCE_QUANTUM_S,
  DEFAULT_FIELD_MODEL,
  THERMAL_FWHM_PER_KT,
  apparentBarrierHeight_eV,
  broadeningKernel,
  convolvedOnset,
  decayConstant_per_nm,
  energyResolution_mV,
  estimateField,
  fwhmOf,
  lockinFwhm_mV,
  lockinKernel,
  resolveFieldModel,
  thermalFwhm_mV,
  thermalKernel,
  tunnellingDistance,
} from "@/lib/spectra";

describe("constants (CODATA 2018)", () => {
  it("Boltzmann constant 8.617333262e-5 eV/K (exact)", () => {
    expect(BOLTZMANN_EV_PER_K).toBeCloseTo(8.617333262e-5, 14);
  });
  it("conductance quantum G0 = 2e²/h = 7.748091729e-5 S (exact)", () => {
    expect(Math.abs(CONDUCTANCE_QUANTUM_S - 7.748091729e-5) / 7.748091729e-5).toBeLessThan(1e-9);
  });
});

describe("energy resolution", () => {
  it("FWHM of −∂f/∂E is 4 ln(1+√2) k_BT = 3.5255 k_BT (standard result), also measured on the kernel", () => {
    expect(THERMAL_FWHM_PER_KT).toBeCloseTo(3.5255, 4);
    const T = 4.5;
    const kT = BOLTZMANN_EV_PER_K * T;
    const x = Array.from({ length: 20001 }, (_, i) => (i - 10000) * kT * 1e-3);
    const y = x.map((v) => thermalKernel(v, T));
    expect(fwhmOf(x, y) / kT).toBeCloseTo(3.5255, 3);
    expect(thermalFwhm_mV(T)).toBeCloseTo(3.5255 * kT * 1000, 3);
  });
  it("lock-in kernel (2/πV_m²)√(V_m² − V²) (Klein et al., PRB 7, 2336 (1973), form from memory) has FWHM √3·V_peak = 2.449 V_rms", () => {
    const vm = Math.SQRT2 * 0.005;
    const x = Array.from({ length: 40001 }, (_, i) => (i - 20000) * vm * 1e-4);
    const y = x.map((v) => lockinKernel(v, vm));
    expect(fwhmOf(x, y) / vm).toBeCloseTo(Math.sqrt(3), 3);
    expect(lockinFwhm_mV(5) / 5).toBeCloseTo(2.449, 3);
    // Normalised: ∫ K = 1 (closed form; tolerance from the Riemann sum on this grid).
    const area = y.reduce((a, b) => a + b, 0) * vm * 1e-4;
    expect(area).toBeCloseTo(1, 4);
  });
  it("combined resolution is the quadrature sum (common practice), e.g. 4.5 K with 2 mV rms", () => {
    const r = energyResolution_mV(4.5, 2);
    expect(r).toBeCloseTo(Math.hypot(3.5255 * 8.617333262e-5 * 4.5 * 1000, 2.4495 * 2), 3);
  });
  it("combined kernel tables: unit mass, zero mean, variance π²(k_BT)²/3 + V_m²/4 (moments of the two kernels, closed form)", () => {
    for (const [T, vrms] of [[1.2, 1], [4.5, 3], [77, 8]]) {
      const k = broadeningKernel(T, vrms);
      const kT = BOLTZMANN_EV_PER_K * T;
      const vm = Math.SQRT2 * vrms * 1e-3;
      const expected = (Math.PI ** 2 * kT * kT) / 3 + (vm * vm) / 4;
      expect(k.k1[k.n - 1]).toBeCloseTo(1, 12);
      expect(Math.abs(k.m1[k.n - 1])).toBeLessThan(1e-15);
      expect(Math.abs(k.variance - expected) / expected).toBeLessThan(2e-3);
      // Broadened step is ½ at the edge (symmetric kernel), ramp → x far beyond.
      const o = new Float64Array(3);
      convolvedOnset(k, 0, o);
      expect(o[0]).toBeCloseTo(0.5, 6);
      convolvedOnset(k, 1, o);
      expect(o[1]).toBe(1);
    }
  });
});

describe("tunnelling distance", () => {
  it("κ = √(2m_eφ)/ħ = 0.5123167 Å⁻¹·√(φ/eV) (from CODATA 2018 constants)", () => {
    for (const phi of [1, 4, 4.5, 5]) expect(decayConstant_per_nm(phi) / 10 / Math.sqrt(phi)).toBeCloseTo(0.5123167, 6);
  });
  it("rule of thumb: current × 7.8 / 8.8 / 9.9 per Å of approach for φ = 4 / 4.5 / 5 eV (common practice; computed from κ)", () => {
    const f = (phi: number) => Math.exp((2 * decayConstant_per_nm(phi)) / 10);
    expect(f(4)).toBeCloseTo(7.8, 1);
    expect(f(4.5)).toBeCloseTo(8.8, 1);
    expect(f(5)).toBeCloseTo(9.9, 1);
  });
  it("worked example: 1 V, 100 pA, φ = 4.5 eV → z − z_c = 6.24 Å (computed)", () => {
    const d = tunnellingDistance({ setpointBias_V: 1, setpointCurrent_A: 100e-12, barrier_eV: 4.5, contactDistance_nm: 0 });
    expect(d * 10).toBeCloseTo(6.24, 2);
    // Contact distance and z offset add linearly; negative z offset = closer.
    const d2 = tunnellingDistance({ setpointBias_V: -1, setpointCurrent_A: -100e-12, barrier_eV: 4.5, contactDistance_nm: 0.25, zOffset_pm: -50 });
    expect(d2).toBeCloseTo(d + 0.25 - 0.05, 12);
  });
  it("at the conductance quantum the distance is the contact distance", () => {
    const d = tunnellingDistance({ setpointBias_V: 0.01, setpointCurrent_A: 0.01 * CONDUCTANCE_QUANTUM_S, barrier_eV: 4, contactDistance_nm: 0.25 });
    expect(d).toBeCloseTo(0.25, 12);
  });
  it("apparent barrier height φ = 0.952 × (d ln I/dz [Å⁻¹])² (follows from κ)", () => {
    expect(apparentBarrierHeight_eV(10) /* 1 Å⁻¹ */).toBeCloseTo(0.952, 3);
    expect(apparentBarrierHeight_eV(2 * decayConstant_per_nm(4.5))).toBeCloseTo(4.5, 9);
  });
  it("rejects a zero setpoint", () => {
    expect(() => tunnellingDistance({ setpointBias_V: 0, setpointCurrent_A: 1e-10, barrier_eV: 4, contactDistance_nm: 0.25 })).toThrow(RangeError);
  });
});

describe("field estimate", () => {
  const model = resolveFieldModel({ tipWorkFunction_eV: 4.7, sampleWorkFunction_eV: 3.9, contactDistance_nm: 0.25 });
  const meta = { setpoint_bias_V: 0.6, setpoint_current_A: 2e-11 };
  const noSigma = { tipWorkFunctionSigma_eV: 0, sampleWorkFunctionSigma_eV: 0, contactDistanceSigma_nm: 0, assumedBarrierSigma_eV: 0 };
  it("E = (Φ_tip − Φ_sample)/(e·d) in V/nm, with κ from the mean work function", () => {
    const f = estimateField(model, meta);
    const d = tunnellingDistance({ setpointBias_V: 0.6, setpointCurrent_A: 2e-11, barrier_eV: 4.3, contactDistance_nm: 0.25 });
    expect(f.distance_nm).toBeCloseTo(d, 12);
    expect(f.field_V_per_nm).toBeCloseTo(0.8 / d, 12);
    expect(f.kappa_per_nm).toBeCloseTo(decayConstant_per_nm(4.3), 12);
    expect(f.assumptions.length).toBeGreaterThan(3);
  });
  it("a measured barrier height replaces the mean; screening divides the field", () => {
    const f = estimateField({ ...model, barrierHeight_eV: 3, screening: 2 }, meta);
    const d = tunnellingDistance({ setpointBias_V: 0.6, setpointCurrent_A: 2e-11, barrier_eV: 3, contactDistance_nm: 0.25 });
    expect(f.field_V_per_nm).toBeCloseTo(0.8 / d / 2, 12);
  });
  it("uncertainty: only σ(d_c) → σ_d = σ(d_c) and σ_E = ΔΦ·σ_d/d² (linear propagation, closed form)", () => {
    const f = estimateField({ ...model, ...noSigma, contactDistanceSigma_nm: 0.05 }, meta);
    expect(f.distanceSigma_nm).toBeCloseTo(0.05, 9);
    expect(f.fieldSigma_V_per_nm).toBeCloseTo((0.8 * 0.05) / f.distance_nm ** 2, 6);
  });
  it("uncertainty: only σ(Φ_sample) → σ_E = σ·|∂E/∂Φ_s| with ∂E/∂Φ_s = −1/d − ΔΦ/d²·∂d/∂Φ_s (closed form)", () => {
    const s = 0.1;
    const f = estimateField({ ...model, ...noSigma, sampleWorkFunctionSigma_eV: s }, meta);
    const g = 7.748091729e-5 / (2e-11 / 0.6);
    // d = d_c + ln(G0/G)/(2κ), κ ∝ √φ̄, φ̄ = (Φt + Φs)/2 → ∂d/∂Φs = −ln(G0/G)/(2κ) · 1/(2φ̄) · 1/2
    const k = decayConstant_per_nm(4.3);
    const dd = (-Math.log(g) / (2 * k)) * (1 / (2 * 4.3)) * 0.5;
    const dE = -1 / f.distance_nm - (0.8 / f.distance_nm ** 2) * dd;
    expect(f.fieldSigma_V_per_nm).toBeCloseTo(Math.abs(dE) * s, 6);
  });
  it("uncertainty: only the assumption's σ_A → σ_d = ln(G₀/G)/(4κφ̄)·σ_A, σ_E = ΔΦ·σ_d/d² (closed form)", () => {
    const sA = 1;
    const f = estimateField({ ...model, ...noSigma, assumedBarrierSigma_eV: sA }, meta);
    // d = d_c + ln(G₀/G)/(2κ), κ ∝ √φ̄ → ∂d/∂φ̄ = −ln(G₀/G)/(2κ)·1/(2φ̄); E = ΔΦ/d (differentiating by hand).
    const lnG = Math.log(7.748091729e-5 / (2e-11 / 0.6));
    const sd = (lnG / (4 * decayConstant_per_nm(4.3) * 4.3)) * sA;
    expect(f.distanceSigma_nm).toBeCloseTo(sd, 6);
    expect(f.fieldSigma_V_per_nm).toBeCloseTo((0.8 * sd) / f.distance_nm ** 2, 6);
    // The nominal values do not move; a ±1 eV barrier is a ±12% κ, several per cent of d here.
    expect(f.field_V_per_nm).toBeCloseTo(estimateField({ ...model, ...noSigma }, meta).field_V_per_nm, 12);
    expect(f.distanceSigma_nm / f.distance_nm).toBeGreaterThan(0.03);
    expect(f.assumptions.join("\n")).toMatch(/mean of tip and sample work functions ± 1\.00 eV \(assumed/);
    // A measured barrier replaces the assumption and its σ.
    const m = estimateField({ ...model, ...noSigma, assumedBarrierSigma_eV: sA, barrierHeight_eV: 4.3 }, meta);
    expect(m.distanceSigma_nm).toBe(0);
  });
  it("fact of the trade: under an STM tip the field is of order 1 V/nm (common practice)", () => {
    // Tungsten tip (4.55 eV, Michaelson 1977, from memory) over a 3.9 eV sample at typical setpoints.
    const w = resolveFieldModel({ tipWorkFunction_eV: 4.55, sampleWorkFunction_eV: 3.9 });
    const fields = [1e-11, 1e-10, 1e-9].map((i) => estimateField(w, { setpoint_bias_V: 1, setpoint_current_A: i }).field_V_per_nm);
    for (const e of fields) expect(e).toBeGreaterThan(0.3);
    for (const e of fields) expect(e).toBeLessThan(3);
  });
  it("defaults live in one place", () => {
    expect(DEFAULT_FIELD_MODEL.contactDistance_nm).toBe(0.25);
    expect(DEFAULT_FIELD_MODEL.barrierHeight_eV).toBeNull();
    expect(DEFAULT_FIELD_MODEL.screening).toBe(1);
    expect(DEFAULT_FIELD_MODEL.assumedBarrierSigma_eV).toBe(1);
  });
});
