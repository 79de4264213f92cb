/**
 * Junction field estimate in the parallel-plate picture: E = (Φ_tip − Φ_sample) / (e·d·s), in V/nm,
 * where d is the tunnelling distance (distance.ts) and s ≥ 1 an optional screening factor (1 = none).
 * Assumptions (also returned with every estimate): zero-bias contact-potential field only, planar
 * electrodes (no tip curvature), no image-potential lowering of the barrier, a one-dimensional WKB
 * barrier of height φ̄. It is an estimate, not a measurement.
 *
 * Uncertainty: linear propagation of the independent uncertainties of Φ_tip, Φ_sample and d_c through
 * both d and E (central differences), and through d of the barrier height: a measured one (κ from I(z)
 * curves) with its σ, or else the work functions' mean with the assumption's own σ
 * (assumedBarrierSigma_eV: the apparent barrier is not the mean, only near it). These are common to every spectrum taken with the same tip on the
 * same sample, so they shift a whole sweep together (a scale error), not point by point.
 */
import { decayConstant_per_nm, tunnellingDistance } from "./distance";
import { median } from "./stats";
import type { FieldModel } from "./settings";
import type { SpectrumMeta } from "./import/types";

export interface FieldEstimate {
  distance_nm: number;
  distanceSigma_nm: number;
  field_V_per_nm: number;
  fieldSigma_V_per_nm: number;
  kappa_per_nm: number;
  barrier_eV: number;
  assumptions: string[];
}

interface Params {
  phiT: number;
  phiS: number;
  dc: number;
  /** Measured barrier height, eV (used only when the model has one). */
  phiB: number;
  /** Offset of the apparent barrier from the work functions' mean, eV (0; used only without phiB). */
  phiA: number;
}

export function fieldAssumptions(model: FieldModel): string[] {
  return [
    "parallel-plate junction: E = (Φ_tip − Φ_sample)/(e·d); tip curvature ignored",
    "field from the contact potential only (bias contribution not added)",
    model.barrierHeight_eV === null
      ? model.assumedBarrierSigma_eV > 0
        ? `barrier height = mean of tip and sample work functions ± ${model.assumedBarrierSigma_eV.toFixed(2)} eV (assumed; ` +
          "measured apparent barriers lie near or below it)"
        : "barrier height = mean of tip and sample work functions; no image-potential lowering"
      : model.barrierHeightSigma_eV > 0
        ? `barrier height = ${model.barrierHeight_eV.toFixed(3)} ± ${model.barrierHeightSigma_eV.toFixed(3)} eV (measured apparent barrier)`
        : `barrier height = ${model.barrierHeight_eV} eV (measured apparent barrier)`,
    `contact distance d_c = ${model.contactDistance_nm} ± ${model.contactDistanceSigma_nm} nm (conductance G₀ at contact)`,
    model.screening === 1 ? "no screening" : `field divided by a screening factor ${model.screening}`,
    "an estimate from a model, not a measurement",
  ];
}

/**
 * Estimate the tip–sample distance and the field for one spectrum.
 * @param model field model (work functions in eV, distances in nm)
 * @param meta needs setpoint_bias_V and setpoint_current_A; z_offset_pm is optional
 * @throws RangeError when the setpoint is missing or zero
 */
export function estimateField(
  model: FieldModel,
  meta: Pick<SpectrumMeta, "setpoint_bias_V" | "setpoint_current_A" | "z_offset_pm">,
): FieldEstimate {
  if (meta.setpoint_bias_V === undefined || meta.setpoint_current_A === undefined)
    throw new RangeError("setpoint bias and current are needed to estimate the distance");
  const compute = (p: Params) => {
    const barrier = model.barrierHeight_eV === null ? (p.phiT + p.phiS) / 2 + p.phiA : p.phiB;
    const d = tunnellingDistance({
      setpointBias_V: meta.setpoint_bias_V!,
      setpointCurrent_A: meta.setpoint_current_A!,
      barrier_eV: barrier,
      contactDistance_nm: p.dc,
      zOffset_pm: meta.z_offset_pm ?? 0,
    });
    return { d, e: (p.phiT - p.phiS) / (d * model.screening), barrier };
  };
  const p0: Params = {
    phiT: model.tipWorkFunction_eV,
    phiS: model.sampleWorkFunction_eV,
    dc: model.contactDistance_nm,
    phiB: model.barrierHeight_eV ?? NaN,
    phiA: 0,
  };
  const c = compute(p0);
  if (!(c.d > 0)) throw new RangeError(`the estimated distance is not positive (${c.d.toFixed(3)} nm); check the setpoint and d_c`);
  let vd = 0;
  let ve = 0;
  const parts: [keyof Params, number][] = [
    ["phiT", model.tipWorkFunctionSigma_eV],
    ["phiS", model.sampleWorkFunctionSigma_eV],
    ["dc", model.contactDistanceSigma_nm],
    // A measured barrier (κ from I(z) curves) takes the work functions' place in d.
    ["phiB", model.barrierHeight_eV === null ? 0 : model.barrierHeightSigma_eV],
    ["phiA", model.barrierHeight_eV === null ? model.assumedBarrierSigma_eV : 0],
  ];
  for (const [k, s] of parts) {
    if (!(s > 0)) continue;
    const hstep = s * 1e-3;
    const up = compute({ ...p0, [k]: p0[k] + hstep });
    const dn = compute({ ...p0, [k]: p0[k] - hstep });
    vd += (((up.d - dn.d) / (2 * hstep)) * s) ** 2;
    ve += (((up.e - dn.e) / (2 * hstep)) * s) ** 2;
  }
  return {
    distance_nm: c.d,
    distanceSigma_nm: Math.sqrt(vd),
    field_V_per_nm: c.e,
    fieldSigma_V_per_nm: Math.sqrt(ve),
    kappa_per_nm: decayConstant_per_nm(c.barrier),
    barrier_eV: c.barrier,
    assumptions: fieldAssumptions(model),
  };
}

/**
 * The per-point part of a field estimate's uncertainty, relative to the field. The model's part
 * (work functions, d_c) is shared by every spectrum of a tip on a sample and cannot tell two of
 * them apart; what differs from one spectrum to the next is the setpoint as read: a current read to
 * about 1% moves d by ln(1.01)/(2κ) ≈ 0.0005 nm and a z offset known to about 1 pm by 0.001 nm,
 * together ≲ 0.15% of d ≈ 0.7 nm (typical preamplifier and piezo precision: common practice, from
 * memory). The stored σ holds the model's part only, so this is the part a point has on its own.
 */
export const OWN_FIELD_REL_SIGMA = 1.5e-3;

/**
 * Whether a set of spectra all sit at one field: two or more, each field within twice its own
 * (per-point) uncertainty of their median. A grid taken at one setpoint does; an approach series
 * does not, even when its steps are small next to the shared model error, which moves every point
 * together and so says nothing about whether two points differ. Returns that field (the median,
 * V/nm) and the number of spectra, or null.
 */
export function sharedField(points: readonly { field_V_per_nm: number }[]): { field_V_per_nm: number; n: number } | null {
  if (points.length < 2) return null;
  const fields = points.map((p) => p.field_V_per_nm);
  if (!fields.every(Number.isFinite)) return null;
  const med = median(fields);
  const bound = 2 * OWN_FIELD_REL_SIGMA * Math.abs(med);
  return fields.every((e) => Math.abs(e - med) <= bound) ? { field_V_per_nm: med, n: points.length } : null;
}

/** Where a stored field model takes κ from (the shape of a field-model version's JSON). */
export interface KappaSourceOf {
  decayConstantSource?: string;
  barrierHeight_eV?: number | null;
  barrierHeightSigma_eV?: number | null;
  curves?: { description: string; kappa_per_nm: number; kappaSigma_per_nm: number } | null;
  assumedBarrierSigma_eV?: number | null;
}

/** Where κ comes from, in words, for the field-model and critical-field cards and the e-mails. */
export function kappaSourceText(m: KappaSourceOf): string {
  if (m.decayConstantSource === "curves" && m.curves) {
    const c = m.curves;
    const phi = m.barrierHeight_eV != null ? `, φ_ap = ${m.barrierHeight_eV.toFixed(2)} ± ${(m.barrierHeightSigma_eV ?? 0).toFixed(2)} eV` : "";
    return `κ = ${c.kappa_per_nm.toFixed(2)} ± ${c.kappaSigma_per_nm.toFixed(2)} nm⁻¹ measured on ${c.description}${phi}`;
  }
  if (m.barrierHeight_eV != null) return `κ from a typed-in apparent barrier of ${m.barrierHeight_eV.toFixed(2)} eV`;
  const sigma = m.assumedBarrierSigma_eV ? ` ± ${m.assumedBarrierSigma_eV.toFixed(2)} eV` : "";
  return `κ from the mean of the tip and sample work functions${sigma} (an assumption)`;
}
