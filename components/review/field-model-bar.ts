import { modelFieldRelSigma } from "@/lib/spectra/crossing";
import { median } from "@/lib/spectra/stats";

/** A point as the bar needs it: its field and the field model's σ of it, V/nm. */
type FieldPoint = { field_V_per_nm: number; fieldSigma_V_per_nm: number | null };

/** The bar's colour: quiet, as it frames the data rather than being data. */
export const FIELD_MODEL_BAR_COLOR = "#6e6a5f";

/** The field model's bar sits this high in the plot (paper units: 0 the axis, 1 the top)... */
export const BAR_Y = 0.95;
/** ...above the data, which keep below this share of the plot's height. */
export const BAR_ROOM = 0.84;

export interface FieldModelBar {
  /** Where the bar is centred: the median field of the shown points, V/nm. */
  x: number;
  /** Its half-length there, V/nm. */
  sigma: number;
  /** The same relative to the field. */
  rel: number;
}

/**
 * The field model's uncertainty (work functions, contact distance), drawn once. It is shared by
 * every point of a sample, a scale error that moves them all together (the fit takes it so,
 * `modelFieldRelSigma`), so an error bar on each point would say each could move on its own; the
 * stored σ has no per-point part to draw. One bar of ±σ at the points' median field, in the
 * strip above the data; null when the points carry no model σ.
 */
export function fieldModelBar(points: readonly FieldPoint[]): FieldModelBar | null {
  const rel = modelFieldRelSigma(points);
  if (!(rel > 0) || !points.length) return null;
  const x = median(points.map((p) => p.field_V_per_nm));
  return { x, sigma: rel * Math.abs(x), rel };
}

/** The bar's words, on the plot beside it and in its legend entry. */
export const fieldModelBarText = (bar: FieldModelBar) =>
  `field model ±${(bar.rel * 100).toPrecision(2)}%, shared by all points`;

/**
 * The bar as one shape with a legend entry: a horizontal stroke with an end tick on each side, x
 * in data, y in paper units, and its words just below it.
 */
export function fieldModelBarShapes(bar: FieldModelBar): {
  shape: Record<string, unknown>;
  annotation: Record<string, unknown>;
} {
  const n = (v: number) => Number(v.toPrecision(7));
  const [a, b, t] = [n(bar.x - bar.sigma), n(bar.x + bar.sigma), 0.02];
  return {
    shape: {
      type: "path",
      path: `M${a},${BAR_Y}H${b}M${a},${BAR_Y - t}V${BAR_Y + t}M${b},${BAR_Y - t}V${BAR_Y + t}`,
      xref: "x",
      yref: "paper",
      line: { color: FIELD_MODEL_BAR_COLOR, width: 1.5 },
      name: fieldModelBarText(bar),
      showlegend: true,
      legendgroup: "field-model",
    },
    annotation: {
      x: bar.x,
      y: BAR_Y - t,
      xref: "x",
      yref: "paper",
      yanchor: "top",
      showarrow: false,
      text: "field model ±σ (shared)",
      font: { size: 11, color: FIELD_MODEL_BAR_COLOR },
    },
  };
}
