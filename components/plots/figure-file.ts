/**
 * Figure files keep their whole legend. A file is drawn afresh at its own size, where a legend
 * under the plot can wrap into more rows than on screen: Plotly then clipped it to half the
 * figure's height, or squeezed the plot and pushed the legend past the bottom edge, and the file
 * lost entries. In a file the legend sits at the bottom of the figure, below the axis, with the
 * bottom margin grown by its height (measured on a probe drawing at the file's width), and the
 * figure grows taller when the plot would otherwise shrink below `MIN_PLOT_SHARE` of its room.
 */

/** Room between the axis title and the legend, px. */
export const LEGEND_GAP = 12;
/** The plot keeps at least this share of the height it would have without a legend. */
export const MIN_PLOT_SHARE = 0.6;

/** Past any legend's height: `maxheight` above 1 is in px, and Plotly never clips below it. */
const UNCLIPPED = 100_000;

/** Files narrower than this (px; the camera button on a phone) list the legend one entry a row. */
export const NARROW_FILE_PX = 640;

interface Margin {
  l?: number;
  r?: number;
  t?: number;
  b?: number;
  [side: string]: unknown;
}

interface FileLayout {
  legend?: object;
  margin?: Margin;
  showlegend?: boolean;
  /** `legendRoom`: px of the bottom margin that hold the screen's legend (a narrow screen's), replaced in a file. */
  meta?: unknown;
}

/** The part of the bottom margin the screen gave its legend, which a file lays out afresh. */
const screenLegendRoom = (layout: FileLayout) =>
  Number((layout.meta as { legendRoom?: number } | undefined)?.legendRoom ?? 0) || 0;

/**
 * The legend of a file `width` px wide: at the figure's foot (container coordinates), never
 * clipped. In a narrow file one entry a row from near the figure's left edge: entries side by side
 * are aligned in columns that can run past the right edge, the more so as a file's text falls
 * back to a wider face than the page's.
 */
export function fileLegend(layout: FileLayout, width: number): object {
  const base = { ...layout.legend, maxheight: UNCLIPPED, yref: "container", y: 0, yanchor: "bottom" };
  if (width >= NARROW_FILE_PX) return base;
  const l = layout.margin?.l ?? 80;
  const plot = Math.max(1, width - l - (layout.margin?.r ?? 80));
  return { ...base, orientation: "v", xref: "paper", x: -Math.max(0, l - 8) / plot, xanchor: "left" };
}

/**
 * The layout and height of a figure file `width` × `height` px whose legend, `legendHeight` px
 * tall as `fileLegend` lays it out, is shown whole: at the foot of the figure, below the plot's own
 * bottom margin. A layout without a legend is left as it is.
 */
export function fileLayout<L extends FileLayout>(
  layout: L,
  { width, height, legendHeight }: { width: number; height: number; legendHeight: number },
): { layout: L; height: number } {
  if (layout.showlegend === false || legendHeight <= 0) return { layout, height };
  const t = layout.margin?.t ?? 80;
  const b = (layout.margin?.b ?? 80) - screenLegendRoom(layout);
  const room = Math.ceil(legendHeight) + LEGEND_GAP;
  const plot = Math.max(0, height - t - b);
  const fitted = Math.max(height, Math.ceil(t + b + room + MIN_PLOT_SHARE * plot));
  return {
    height: fitted,
    layout: { ...layout, margin: { ...layout.margin, b: b + room }, legend: fileLegend(layout, width) },
  };
}

/** The layout for measuring a file's legend: laid out as in the file. */
export function probeLayout<L extends FileLayout>(layout: L, width: number): L {
  return { ...layout, legend: fileLegend(layout, width) };
}

/** The full height of the legend Plotly drew in a graph div (0 when it drew none). */
export function legendHeight(gd: HTMLElement): number {
  const full = gd as unknown as { _fullLayout?: { showlegend?: boolean; legend?: { _height?: number } } };
  return full._fullLayout?.showlegend && gd.querySelector(".legend") ? (full._fullLayout.legend?._height ?? 0) : 0;
}

const ONE_POINT = new Set(["x", "y", "z", "customdata", "text", "hovertext"]);

/**
 * The traces cut to their first point, WebGL ones drawn as SVG: the legend depends on the traces'
 * names, kinds and looks, not on their data, and the probe should not draw 5,000 points (or make
 * a WebGL context) to find it.
 */
export const legendProbe = (data: readonly object[]): object[] =>
  data.map((t) =>
    Object.fromEntries(
      Object.entries(t).map(([k, v]) => [
        k,
        k === "type" && v === "scattergl" ? "scatter" : ONE_POINT.has(k) && Array.isArray(v) ? v.slice(0, 1) : v,
      ]),
    ),
  );
