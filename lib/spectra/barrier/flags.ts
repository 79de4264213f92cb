/**
 * Flags of an I(z) fit: reasons its κ may not be trusted. Like the gap picker's flags, a flag never
 * changes the numbers; it says why they may be wrong, in plain words.
 */

export const BARRIER_FLAG_CODES = [
  "not-exponential",
  "short-range",
  "unusual-barrier",
  "sweeps-disagree",
  "noisy",
] as const;
export type BarrierFlagCode = (typeof BARRIER_FLAG_CODES)[number];

export interface BarrierFlag {
  code: BarrierFlagCode;
  /** Plain-words reason for this curve. */
  message: string;
}

/** Short names for tables and keys. */
export const BARRIER_FLAG_LABELS: Record<BarrierFlagCode, string> = {
  "not-exponential": "not exponential",
  "short-range": "short range",
  "unusual-barrier": "unusual barrier",
  "sweeps-disagree": "sweeps disagree",
  noisy: "noisy",
};

/** What each flag means, for help text and tooltips. */
export const BARRIER_FLAG_HELP: Record<BarrierFlagCode, string> = {
  "not-exponential":
    "ln|I| bends over the fitted range: the apparent barrier changes with the distance (barrier collapse near contact, a tip change, or z drift), so one κ does not describe the curve.",
  "short-range": "The fitted range covers little of the current's decay: κ rests on a short stretch of the curve.",
  "unusual-barrier":
    "The apparent barrier height is far from the few eV of a clean tunnel junction: an adsorbate on the tip, a soft junction, or a z scale that is off.",
  "sweeps-disagree":
    "Approach and retraction give different κ beyond their uncertainties: piezo hysteresis or creep, drift, or a tip change between them.",
  noisy: "The current scatters by more than a few percent about the exponential: vibration or an unstable junction.",
};
