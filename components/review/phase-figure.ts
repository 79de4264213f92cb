import { COLORS } from "@/components/plots/plot";
import { paddedRange } from "@/components/plots/ranges";
import type { getPhase } from "@/lib/services/spectra/getPhase";
import { QUALITY_FLAG_LABELS } from "@/lib/spectra/edges/flags";
import { BAR_ROOM, fieldModelBar } from "./field-model-bar";

/**
 * What the phase plot (Plotly) and its still preview (SVG) both draw from, kept in one place so
 * the two show the same thing in the same place.
 */
export type PhaseData = Awaited<ReturnType<typeof getPhase>>;
export type PhasePoint = PhaseData["points"][number];

/** Plot-area margins of the phase plot, px; Plotly adds the legend's height below. */
export const PHASE_MARGIN = { l: 64, r: 16, t: 28, b: 52 } as const;

/**
 * Screens up to this width (px) are narrow: there Plotly's mode bar, in the figure's top right
 * corner, spans most of the plot's width and covered the E_c label above the plot.
 */
export const NARROW_MAX_PX = 639;
/** The media query for a narrow screen. */
export const NARROW_QUERY = `(max-width: ${NARROW_MAX_PX}px)`;
/** The top margin on a narrow screen with the E_c label: the label sits below the mode bar (about 28 px tall). */
export const PHASE_TOP_NARROW = 56;

/**
 * The phase plot's margins: on a narrow screen, a taller top margin with the E_c label and a
 * bottom margin that holds the legend (`legendRoom`, px) below the axis title.
 */
export function phaseMargin(
  narrow: boolean,
  criticalFieldLabel: boolean,
  legendRoom = 0,
): { l: number; r: number; t: number; b: number } {
  if (!narrow) return PHASE_MARGIN;
  return { ...PHASE_MARGIN, t: criticalFieldLabel ? PHASE_TOP_NARROW : PHASE_MARGIN.t, b: PHASE_MARGIN.b + legendRoom };
}

/**
 * On a narrow screen the legend lists one entry a row at the figure's foot, below the x-axis title
 * (Plotly's own place for it, a fraction of the plot's height below the axis, put it over the
 * title once the legend's rows had squeezed the plot), and the plot's box grows by its height, so
 * the plot keeps the size it has on a wide screen. Plotly draws a one-line entry 20 px tall.
 */
export const LEGEND_ROW_PX = 20;
/** Room between the x-axis title and a narrow screen's legend, px. */
export const LEGEND_GAP_PX = 12;

/** The height a narrow screen's legend of `entries` entries takes, with the gap above it, px. */
export const narrowLegendRoom = (entries: number) => (entries > 0 ? entries * LEGEND_ROW_PX + LEGEND_GAP_PX : 0);

/**
 * The legend's layout on a narrow screen: at the foot of the figure, from the plot's left edge (one
 * at the figure's left edge was taken for a legend beside the plot, which Plotly made room for).
 */
export const NARROW_LEGEND = {
  orientation: "v",
  yref: "container",
  y: 0,
  yanchor: "bottom",
  xref: "paper",
  x: 0,
  xanchor: "left",
  font: { size: 11 },
  // Series in legend groups (WebGL bars, the model's bar) would add 10 px between entries.
  tracegroupgap: 0,
} as const;

/** How many entries Plotly's legend lists: traces not kept out of it, and shapes given one. */
export function legendEntries(
  traces: readonly Record<string, unknown>[],
  shapes: readonly Record<string, unknown>[],
): number {
  return traces.filter((t) => t.showlegend !== false).length + shapes.filter((s) => s.showlegend === true).length;
}

/** Colours of the fit, its band, the critical field's two intervals and excluded points. */
export const PHASE_LOOK = {
  fit: "#b9512a",
  band: "rgba(185,81,42,0.14)",
  /** The interval with the field model's common uncertainty. */
  ciModel: "rgba(185,81,42,0.05)",
  /** The interval from the points' scatter alone. */
  ciStatistical: "rgba(185,81,42,0.16)",
  excluded: "#8a8478",
  /** The ring around a point whose pick carries a quality flag (ink, not a series colour). */
  flagRing: "#1c2430",
} as const;

/** Out of the fit: excluded by hand, or left out by the lab's setting for flagged spectra. */
export const outOfFit = (p: PhasePoint) => p.excluded || p.excludedByFlag;

/** Counts for the key under the plot: each point once by how it enters the fit, and the flagged ones. */
export function phaseCounts(points: readonly PhasePoint[]) {
  const n = { auto: 0, corrected: 0, excluded: 0, excludedByFlag: 0, flagged: 0, accepted: 0 };
  for (const p of points) {
    if (p.flags.length) n.flagged++;
    if (p.excluded) n.excluded++;
    else if (p.excludedByFlag) n.excludedByFlag++;
    else if (p.source === "corrected") n.corrected++;
    else {
      n.auto++;
      if (p.accepted) n.accepted++;
    }
  }
  return n;
}

/** The series of points without a region, when other points of the sample have one. */
export const UNTAGGED_SERIES = "no region tagged";
/** The one series when no point of the sample has a region. */
export const ONLY_SERIES = "spectra";

/** A point's region, or null when none is tagged (an empty name counts as none). */
export const regionOf = (p: PhasePoint): string | null => p.region || null;

/**
 * The phase plot's series: the sample's regions in name order, then the points without a region
 * ("no region tagged"), each with its series colour; when no point has a region, one series
 * ("spectra"). `region` is what `regionOf` gives for the series' points; `name` is what the legend
 * says.
 */
export function regionColors(points: readonly PhasePoint[]): { region: string | null; name: string; color: string }[] {
  const tagged = new Set<string>();
  let untagged = false;
  for (const p of points) {
    const r = regionOf(p);
    if (r == null) untagged = true;
    else tagged.add(r);
  }
  const regions: (string | null)[] = [...tagged].sort();
  if (untagged) regions.push(null);
  return regions.map((region, i) => ({
    region,
    name: region ?? (tagged.size ? UNTAGGED_SERIES : ONLY_SERIES),
    color: COLORS[i % COLORS.length],
  }));
}

export interface PhaseRanges {
  /** Field, V/nm. */
  x: [number, number];
  /** Gap, meV. */
  y: [number, number];
}

/**
 * The field-mode axis ranges of the phase plot: every shown point with its gap's error bar, the
 * field model's bar, the fitted curve and band, and the critical field's interval, padded by 5%;
 * the gap axis from zero, with a strip on top for the bar. Given to Plotly as fixed ranges, and to
 * the preview, so the two line up.
 */
export function fieldModeRanges(data: PhaseData, showExcluded: boolean): PhaseRanges | null {
  const xs: number[] = [];
  const ys: number[] = [];
  const shown = data.points.filter((p) => showExcluded || !outOfFit(p));
  for (const p of shown) {
    const sy = (p.gapSigma_eV ?? 0) * 1000;
    xs.push(p.field_V_per_nm);
    ys.push(p.gap_eV * 1000 - sy, p.gap_eV * 1000 + sy);
  }
  const bar = fieldModelBar(shown);
  if (bar) xs.push(bar.x - bar.sigma, bar.x + bar.sigma);
  const c = data.crossing;
  if ("curve" in c && c.curve && c.state !== "none") {
    xs.push(...c.curve.field);
    ys.push(...c.curve.hi.map((v: number) => v * 1000));
  }
  if (c.state === "crossed" && c.ci95_V_per_nm) xs.push(...c.ci95_V_per_nm);
  const x = paddedRange(xs);
  const y = paddedRange(ys, { includeZero: true });
  // With the field model's bar, the data keep below BAR_ROOM of the height: the bar has the top strip.
  if (y && bar) y[1] = y[0] + (y[1] - y[0]) / BAR_ROOM;
  return x && y ? { x, y } : null;
}

/**
 * Error bars as one SVG path in data coordinates (`M x,y-σy V y+σy` and `M x-σx,y H x+σx` per
 * point; zero or missing σ draws nothing). Used with WebGL markers: Plotly's WebGL error bars for
 * 5,000 points took about 0.35 s more to reach the screen in software rendering than one path
 * under the canvas, which looks the same.
 */
export function errorBarPaths(points: readonly { x: number; y: number; sx?: number | null; sy?: number | null }[]): {
  vertical: string;
  horizontal: string;
} {
  const n = (v: number) => Number(v.toPrecision(7));
  let vertical = "";
  let horizontal = "";
  for (const { x, y, sx, sy } of points) {
    if (sy && sy > 0) vertical += `M${n(x)},${n(y - sy)}V${n(y + sy)}`;
    if (sx && sx > 0) horizontal += `M${n(x - sx)},${n(y)}H${n(x + sx)}`;
  }
  return { vertical, horizontal };
}

/**
 * One series of rings, one around each shown point whose pick carries a quality flag: drawn over
 * the points (a ring hides nothing), in ink so it reads on every region's colour, and in one trace
 * (WebGL from WEBGL_FROM points, like the points) whatever the number of flagged points. Clicking a
 * ring opens that spectrum; hovering names the flags.
 */
export function flagRingTrace(
  points: readonly PhasePoint[],
  x: (p: PhasePoint) => number | null,
  type: "scatter" | "scattergl",
): Record<string, unknown> | null {
  const pts = points.filter((p) => p.flags.length > 0 && x(p) != null);
  if (!pts.length) return null;
  return {
    type,
    mode: "markers",
    name: "⚑ flagged (quality flag)",
    x: pts.map((p) => x(p)!),
    y: pts.map((p) => p.gap_eV * 1000),
    customdata: pts.map((p) => p.spectrumId),
    text: pts.map((p) => p.flags.map((f) => QUALITY_FLAG_LABELS[f.code] ?? f.code).join(", ")),
    marker: {
      symbol: "circle-open",
      size: 15,
      color: PHASE_LOOK.flagRing,
      line: { width: 1.5, color: PHASE_LOOK.flagRing },
    },
    hovertemplate: "flagged: %{text}<extra></extra>",
  };
}

/** From this many points the phase plot uses WebGL markers. */
export const WEBGL_FROM = 1500;

/**
 * The gap-direction error bars of a WebGL series, as one SVG path shape below the canvas, in the
 * series' legend group so that hiding the series hides its bars.
 */
export function gapErrorBarShape(path: string, color: string, legendgroup: string): Record<string, unknown> {
  return { type: "path", path, xref: "x", yref: "y", layer: "below", line: { color, width: 1 }, legendgroup };
}
