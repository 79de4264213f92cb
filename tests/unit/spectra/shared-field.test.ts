import { describe, expect, it } from "vitest";
import { estimateField, OWN_FIELD_REL_SIGMA, resolveFieldModel, sharedField } from "@/lib/spectra";

// Default field model (work functions, d_c); setpoints typical of the demo's sessions (invented).
const model = resolveFieldModel({ tipWorkFunction_eV: 4.6, sampleWorkFunction_eV: 4.3 });
const fieldAt = (zOffset_pm: number, current_A = 2e-10, m = model) =>
  ({ field_V_per_nm: estimateField(m, { setpoint_bias_V: 0.6, setpoint_current_A: current_A, z_offset_pm: zOffset_pm }).field_V_per_nm });

describe("sharedField: whether a sample's spectra sit at one field", () => {
  it("a grid taken at one setpoint is one field, its median", () => {
    const grid = Array.from({ length: 16 }, () => fieldAt(0));
    expect(sharedField(grid)).toEqual({ field_V_per_nm: grid[0].field_V_per_nm, n: 16 });
  });

  it("an approach series in 5 pm steps is not, though its steps are far smaller than the model's σ", () => {
    const series = Array.from({ length: 8 }, (_, i) => fieldAt(-5 * i));
    const sigma = estimateField(model, { setpoint_bias_V: 0.6, setpoint_current_A: 2e-10 }).fieldSigma_V_per_nm;
    const span = series[series.length - 1].field_V_per_nm - series[0].field_V_per_nm;
    // The shared model error would hide the whole series: the rule must not use it.
    expect(span).toBeLessThan(sigma);
    expect(sharedField(series)).toBeNull();
  });

  it("counts a setpoint current read 1% differently as the same field (its own uncertainty)", () => {
    expect(sharedField([fieldAt(0, 2e-10), fieldAt(0, 2.02e-10), fieldAt(0, 1.98e-10)])).not.toBeNull();
  });

  it("draws the line at twice the per-point uncertainty of the median", () => {
    const inside = [{ field_V_per_nm: 1 }, { field_V_per_nm: 1 }, { field_V_per_nm: 1 + 1.9 * OWN_FIELD_REL_SIGMA }];
    const outside = [{ field_V_per_nm: 1 }, { field_V_per_nm: 1 }, { field_V_per_nm: 1 + 2.1 * OWN_FIELD_REL_SIGMA }];
    expect(sharedField(inside)?.field_V_per_nm).toBe(1);
    expect(sharedField(outside)).toBeNull();
  });

  it("two tips of different work function on one setpoint are two fields", () => {
    const other = resolveFieldModel({ tipWorkFunction_eV: 4.8, sampleWorkFunction_eV: 4.3 });
    expect(sharedField([fieldAt(0), fieldAt(0), fieldAt(0, 2e-10, other)])).toBeNull();
  });

  it("needs two spectra or more, all with a finite field", () => {
    expect(sharedField([])).toBeNull();
    expect(sharedField([fieldAt(0)])).toBeNull();
    expect(sharedField([fieldAt(0), { field_V_per_nm: Number.NaN }])).toBeNull();
  });
});
