import { axis, baseLayout, COLORS } from "@/components/plots/look";

/** One stored curve with its arrays, as the session's barrier answer gives it with `data`. */
export interface CurveData {
  id: string;
  label: string;
  file: string;
  status: "ok" | "error";
  z_nm: number[];
  current_A: number[];
  pointStatus: number[];
  sweeps: { direction: string; from: number; to: number; lnI0: number; slope_per_nm: number; offset_A: number; sign: number; range_nm: [number, number] }[];
}

/** Why a point is out of the fit, as the legend names it (index = stored status, 0 = used). */
export const DROPPED = ["", "noise floor", "saturation", "point contact", "outlier"] as const;
const DROPPED_COLOR = ["", "#9aa3ad", "#b9512a", "#5b4b8a", "#a13d63"];

/**
 * A curve's figure: |I| on a log axis against z (the used points of each sweep, the points left out
 * in grey-toned groups by reason, the fitted exponential over the whole z range, and the z outside
 * the fitted range shaded), and below it the residuals ln|I| − fit of the used points.
 */
export function approachFigure(c: CurveData) {
  const data: Record<string, unknown>[] = [];
  const shapes: Record<string, unknown>[] = [];
  const zAll = c.z_nm;
  const zMin = Math.min(...zAll);
  const zMax = Math.max(...zAll);
  c.sweeps.forEach((s, k) => {
    const color = COLORS[k % COLORS.length];
    const idx: number[] = [];
    for (let i = s.from; i < s.to; i++) if (c.pointStatus[i] === 0) idx.push(i);
    const abs = (i: number) => Math.abs(c.current_A[i] - s.offset_A) * 1e12;
    data.push({
      type: "scatter",
      mode: "markers",
      name: `${s.direction}: used`,
      legendgroup: s.direction,
      x: idx.map((i) => zAll[i]),
      y: idx.map(abs),
      marker: { size: 4, color },
      hovertemplate: "z %{x:.3f} nm<br>|I| %{y:.3g} pA<extra></extra>",
    });
    const line = [zMin, zMax];
    data.push({
      type: "scatter",
      mode: "lines",
      name: `${s.direction}: fit, κ = ${(-s.slope_per_nm / 2).toFixed(2)} nm⁻¹`,
      legendgroup: s.direction,
      x: line,
      y: line.map((z) => Math.exp(s.lnI0 + s.slope_per_nm * z) * 1e12),
      line: { color, width: 1.5, dash: k ? "dash" : "solid" },
      hoverinfo: "skip",
    });
    data.push({
      type: "scatter",
      mode: "markers",
      name: `${s.direction}: residual`,
      legendgroup: s.direction,
      showlegend: false,
      xaxis: "x2",
      yaxis: "y2",
      x: idx.map((i) => zAll[i]),
      y: idx.map((i) => Math.log(Math.abs(c.current_A[i] - s.offset_A)) - (s.lnI0 + s.slope_per_nm * zAll[i])),
      marker: { size: 3, color },
      hovertemplate: "z %{x:.3f} nm<br>ln|I| − fit %{y:.3f}<extra></extra>",
    });
  });
  for (let code = 1; code < DROPPED.length; code++) {
    const idx = c.pointStatus.flatMap((s, i) => (s === code ? [i] : []));
    if (!idx.length) continue;
    data.push({
      type: "scatter",
      mode: "markers",
      name: `left out: ${DROPPED[code]} (${idx.length})`,
      x: idx.map((i) => zAll[i]),
      y: idx.map((i) => Math.max(Math.abs(c.current_A[i]) * 1e12, 1e-3)),
      marker: { size: 4, color: DROPPED_COLOR[code], opacity: 0.55, symbol: "circle-open" },
      hovertemplate: `z %{x:.3f} nm<br>|I| %{y:.3g} pA<br>${DROPPED[code]}<extra></extra>`,
    });
  }
  // The z outside every sweep's fitted range, shaded.
  if (c.sweeps.length) {
    const lo = Math.min(...c.sweeps.map((s) => s.range_nm[0]));
    const hi = Math.max(...c.sweeps.map((s) => s.range_nm[1]));
    const shade = { type: "rect", xref: "x", yref: "paper", y0: 0, y1: 1, fillcolor: "#9aa3ad", opacity: 0.12, line: { width: 0 }, layer: "below" };
    if (lo > zMin) shapes.push({ ...shade, x0: zMin, x1: lo });
    if (hi < zMax) shapes.push({ ...shade, x0: hi, x1: zMax });
  }
  const layout = baseLayout({
    margin: { l: 64, r: 16, t: 12, b: 48 },
    // Two panels on one z scale: the curve above (its z labels left to the panel below), the residuals below.
    xaxis: axis("", { anchor: "y", showticklabels: false }),
    xaxis2: axis("z (nm), negative = closer", { anchor: "y2", matches: "x" }),
    yaxis: axis("|I| (pA)", { type: "log", domain: [0.3, 1], exponentformat: "power" }),
    yaxis2: axis("ln|I| − fit", { domain: [0, 0.24], zeroline: true, anchor: "x2" }),
    shapes,
    legend: { orientation: "h", y: -0.22, font: { size: 11 } },
  });
  return { data, layout };
}
