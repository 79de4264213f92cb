/**
 * The view a gap is picked on: the extraction settings name it (`normalisation.method`), the pick is
 * made on that view's values and the result says which view it was (`view`), so a stored pick can
 * record it.
 */
import { pickGap, type GapPick } from "../edges/pick";
import type { SpectrumMeta } from "../import/types";
import type { ExtractionSettings } from "../settings";
import { normaliseSpectrum, type Normalised } from "./normalise";

export interface ViewInput {
  bias_V: ArrayLike<number>;
  didv: ArrayLike<number>;
  current_A?: ArrayLike<number> | null;
  stderr?: ArrayLike<number> | null;
  meta?: Partial<SpectrumMeta>;
}

export interface PickedView {
  pick: GapPick;
  view: Normalised;
}

/** Normalise as the settings say (PrepareError when the view cannot be made) and pick on that view. */
export function pickOnView(input: ViewInput, settings: ExtractionSettings): PickedView {
  const view = normaliseSpectrum(input, settings.normalisation);
  const values = view.method === "none" ? input.didv : view.values;
  const pick = pickGap({ bias_V: input.bias_V, didv: values, meta: input.meta }, settings);
  if (view.method !== "none") pick.warnings.unshift(...view.warnings, `gap picked on the ${view.description}`);
  return { pick, view };
}
