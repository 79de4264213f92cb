/**
 * Quality flags: reasons a gap pick may not be trusted, each stored with the pick (and the settings
 * version that made it) and shown wherever the pick is shown. A flag never changes the numbers; it
 * says why they may be wrong, in plain words.
 */

/** Every flag the picker can raise, in the order they are listed to people. */
export const QUALITY_FLAG_CODES = ["unreliable-edge", "sloped-background", "glitch", "clipped", "tip-change", "drift", "noisy"] as const;
export type QualityFlagCode = (typeof QUALITY_FLAG_CODES)[number];

export interface QualityFlag {
  code: QualityFlagCode;
  /** Plain-words reason for this spectrum ("the valence-band edge estimates disagree by 42 mV …"). */
  message: string;
  /** Biases (V) the flag refers to, where it has a place (a removed glitch, a clipped range). */
  at_V?: number[];
}

/** Short names for tables, filters and keys. */
export const QUALITY_FLAG_LABELS: Record<QualityFlagCode, string> = {
  "unreliable-edge": "unreliable edge",
  "sloped-background": "sloped background",
  glitch: "glitch removed",
  clipped: "clipped",
  "tip-change": "tip change",
  drift: "drift",
  noisy: "noisy",
};

/** What each flag means, for help text and tooltips. */
export const QUALITY_FLAG_HELP: Record<QualityFlagCode, string> = {
  "unreliable-edge":
    "The data do not pin a band edge down: its estimates disagree beyond their uncertainties, they depend on a choice the data cannot make (a weak onset against a sloping floor), the signal rises more sharply beyond the edge than at it, or only one of the two edges was found.",
  "sloped-background": "The in-gap floor is not flat (tip density of states, bias-dependent transmission); the edges were read against a sloped baseline.",
  glitch: "Single-point spikes were replaced by the mean of their neighbours before picking.",
  clipped: "The signal sits at a constant maximum or minimum over several points (amplifier or lock-in saturation).",
  "tip-change": "A repeat or neighbour differs beyond the noise, or the current jumps: the tip may have changed.",
  drift: "Repeats or forward and backward sweeps disagree, or the baseline wanders during the sweep.",
  noisy: "The onsets are weak compared with the noise: the edges are poorly defined.",
};
