/**
 * Tunnelling distance from the setpoint, in the one-dimensional WKB barrier picture.
 *
 *   d = d_c + ln(G₀ / G_set) / (2κ) + Δz,   G_set = |I_set / V_set|,   κ = √(2 m_e φ̄) / ħ
 *
 * with G₀ = 2e²/h the conductance quantum (a point contact conducts about G₀ at d = d_c), φ̄ the mean
 * barrier height (by default the mean of the tip and sample work functions), d_c the contact distance
 * and Δz the z offset applied after the feedback loop was opened (negative = tip moved closer).
 * Constants: CODATA 2018 (constants.ts).
 */
import { CONDUCTANCE_QUANTUM_S, ELECTRON_MASS_KG, ELEMENTARY_CHARGE_C, HBAR_J_S } from "./constants";

/** Decay constant κ = √(2 m_e φ)/ħ of the tunnelling current's amplitude, in 1/nm, for φ in eV. */
export function decayConstant_per_nm(barrier_eV: number): number {
  if (!(barrier_eV > 0)) throw new RangeError(`barrier height must be > 0 eV, got ${barrier_eV}`);
  return Math.sqrt(2 * ELECTRON_MASS_KG * barrier_eV * ELEMENTARY_CHARGE_C) / HBAR_J_S / 1e9;
}

/** Apparent barrier height φ [eV] from the slope d ln I / dz [1/nm]: φ = (ħ² / 8 m_e)·(d ln I/dz)². */
export function apparentBarrierHeight_eV(dlnI_dz_per_nm: number): number {
  const k = dlnI_dz_per_nm * 1e9;
  return (HBAR_J_S * HBAR_J_S * k * k) / (8 * ELECTRON_MASS_KG) / ELEMENTARY_CHARGE_C;
}

export interface TunnellingDistanceInput {
  /** Setpoint bias, V (non-zero). */
  setpointBias_V: number;
  /** Setpoint current, A (non-zero; the sign is ignored). */
  setpointCurrent_A: number;
  /** Barrier height φ̄, eV. */
  barrier_eV: number;
  /** Contact distance d_c, nm. */
  contactDistance_nm: number;
  /** z offset after opening the feedback, pm (negative = closer). Default 0. */
  zOffset_pm?: number;
}

/**
 * Tip–sample distance in nm (see the module note for the formula).
 * @throws RangeError for a zero setpoint bias or current, or a non-positive barrier height
 */
export function tunnellingDistance(input: TunnellingDistanceInput): number {
  const { setpointBias_V, setpointCurrent_A, barrier_eV, contactDistance_nm } = input;
  if (!(Math.abs(setpointBias_V) > 0) || !Number.isFinite(setpointBias_V))
    throw new RangeError("setpoint bias must be a non-zero finite number of volts");
  if (!(Math.abs(setpointCurrent_A) > 0) || !Number.isFinite(setpointCurrent_A))
    throw new RangeError("setpoint current must be a non-zero finite number of amperes");
  const g = Math.abs(setpointCurrent_A / setpointBias_V);
  const kappa = decayConstant_per_nm(barrier_eV);
  return contactDistance_nm + Math.log(CONDUCTANCE_QUANTUM_S / g) / (2 * kappa) + (input.zOffset_pm ?? 0) / 1000;
}
