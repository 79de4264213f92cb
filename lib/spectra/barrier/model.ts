/**
 * Synthetic I(z) approach curves from a documented physical model, with a known decay constant κ.
 * Used by the tests, the command line's tests and the demo data.
 *
 * z is the tip height relative to the setpoint, nm, negative = closer (as `z_offset_pm`). Every term
 * with its physical origin:
 *
 *   I_meas(z) = clip_sat( I_tun(z)·(1 + σ_rel·ε₁) + I_off + σ_floor·ε₂ )
 *   I_tun(z)  = I_set · exp(−2κz)               z > z_jump   tunnelling through a one-dimensional
 *                                                            WKB barrier: the amplitude decays as
 *                                                            exp(−κz), the current as its square
 *             = G_c·G₀·V_set                    z ≤ z_jump   point contact: an atom of the tip (or the
 *                                                            sample) jumps into contact and the
 *                                                            junction conducts a fraction G_c of the
 *                                                            conductance quantum G₀ = 2e²/h, nearly
 *                                                            independent of z from there on
 *   σ_rel  `relNoise`: multiplicative scatter of the tunnelling current: mechanical vibration of the
 *          gap (a height noise δz gives δI/I = 2κ·δz; 1 pm rms at κ = 10/nm is 2%) and the junction's
 *          own 1/f noise, white here (independent from point to point)
 *   I_off  `offset_A`: the current amplifier's input offset, constant over a curve
 *   σ_floor `floor_A`: the current amplifier's noise floor (Johnson noise of the feedback resistor
 *          and the input stage, after the filter): additive, independent of the current; an
 *          exponential that falls below it is lost in it
 *   clip_sat `saturation_A`: the preamplifier's output saturates (a 10⁹ V/A amplifier at ±10 V
 *          reads at most 10 nA), so |I| is flat-topped at this level
 *   ε₁, ε₂ independent standard normal deviates from the seeded generator (random.ts)
 *
 * A sweep is `n` points from `zFrom_nm` to `zTo_nm`; with `retraction`, the tip goes back to
 * `zFrom_nm` over another `n` points (one z column forth and back, as an instrument records it), and
 * the retraction's z is read on a scale `retractionScale` times the approach's (piezo hysteresis and
 * creep make the same voltage move the tip by different lengths in the two directions).
 */
import { CONDUCTANCE_QUANTUM_S } from "../constants";
import { makeRng } from "../random";

export interface ApproachModel {
  /** Decay constant κ, 1/nm (I ∝ exp(−2κz)). */
  kappa_per_nm: number;
  /** Setpoint current at z = 0, A (its sign is the bias's). Default 100 pA. */
  setpointCurrent_A?: number;
  /** Setpoint bias, V; used for the contact current. Default 0.1 V. */
  setpointBias_V?: number;
  /** First z of the sweep, nm. Default +0.2 (withdrawn). */
  zFrom_nm?: number;
  /** Last z of the sweep, nm. Default −0.3 (closer). */
  zTo_nm?: number;
  /** Points per sweep. Default 200. */
  n?: number;
  /** Relative (multiplicative) scatter σ_rel. Default 0.02. */
  relNoise?: number;
  /** Amplifier noise floor σ_floor, A. Default 0.5 pA. */
  floor_A?: number;
  /** Amplifier offset, A. Default 0. */
  offset_A?: number;
  /** Preamplifier saturation level, A; null = none. Default null. */
  saturation_A?: number | null;
  /** Point contact: below `at_nm` the junction conducts `conductance_G0`·G₀. Default none. */
  contact?: { at_nm: number; conductance_G0: number } | null;
  /** Add the retraction back to zFrom_nm. Default false. */
  retraction?: boolean;
  /** z scale of the retraction relative to the approach (piezo hysteresis). Default 1. */
  retractionScale?: number;
  /** Seed of the random generator. Default 1. */
  seed?: number;
}

export interface SyntheticApproach {
  /** Tip height, nm, as recorded (approach, then retraction if asked for). */
  z_nm: Float64Array;
  /** Measured current, A. */
  current_A: Float64Array;
  /** The κ each sweep was made with, 1/nm: the approach's, then the retraction's (κ / scale). */
  truth: { kappa_per_nm: number[] };
}

/** The noise-free tunnelling (or contact) current at height z, A. */
function tunnelCurrent(
  z: number,
  kappa: number,
  m: Required<Pick<ApproachModel, "setpointCurrent_A" | "setpointBias_V">>,
  contact: ApproachModel["contact"],
): number {
  if (contact && z <= contact.at_nm) return contact.conductance_G0 * CONDUCTANCE_QUANTUM_S * m.setpointBias_V;
  return m.setpointCurrent_A * Math.exp(-2 * kappa * z);
}

/** A synthetic I(z) curve (see the module note for the model and its terms). */
export function makeApproachCurve(model: ApproachModel): SyntheticApproach {
  const {
    kappa_per_nm: kappa,
    setpointCurrent_A = 100e-12,
    setpointBias_V = 0.1,
    zFrom_nm = 0.2,
    zTo_nm = -0.3,
    n = 200,
    relNoise = 0.02,
    floor_A = 0.5e-12,
    offset_A = 0,
    saturation_A = null,
    contact = null,
    retraction = false,
    retractionScale = 1,
    seed = 1,
  } = model;
  if (!(kappa > 0)) throw new RangeError("κ must be positive");
  if (!(n >= 2)) throw new RangeError("a sweep needs at least 2 points");
  const rng = makeRng(seed);
  const total = retraction ? 2 * n : n;
  const z = new Float64Array(total);
  const current = new Float64Array(total);
  const sp = { setpointCurrent_A, setpointBias_V };
  const step = (zTo_nm - zFrom_nm) / (n - 1);
  for (let i = 0; i < total; i++) {
    const back = i >= n;
    // The recorded z; the tip's true height is the recorded one on the retraction's own scale.
    const zi = back ? zTo_nm - step * (i - n) : zFrom_nm + step * i;
    const zTrue = back ? zi * retractionScale : zi;
    const clean = tunnelCurrent(zTrue, kappa, sp, contact);
    let v = clean * (1 + relNoise * rng.normal()) + offset_A + floor_A * rng.normal();
    if (saturation_A !== null) v = Math.max(-saturation_A, Math.min(saturation_A, v));
    z[i] = zi;
    current[i] = v;
  }
  const kappas = retraction ? [kappa, kappa * retractionScale] : [kappa];
  return { z_nm: z, current_A: current, truth: { kappa_per_nm: kappas } };
}
