import { axis, baseLayout } from "@/components/plots/plot";
import {
  errorBarPaths,
  fieldModeRanges,
  flagRingTrace,
  gapErrorBarShape,
  legendEntries,
  narrowLegendRoom,
  outOfFit,
  PHASE_LOOK,
  NARROW_LEGEND,
  phaseMargin,
  type PhaseData,
  type PhasePoint,
  regionColors,
  regionOf,
  WEBGL_FROM,
} from "./phase-figure";
import { fieldModelBar, fieldModelBarShapes } from "./field-model-bar";

export type XMode = "field" | "distance" | "conductance";

/** Each x mode's axis title, scale, value of a point and hover text. */
export const X_AXIS: Record<
  XMode,
  { title: string; type?: "log"; of: (p: PhasePoint) => number | null; hover: string }
> = {
  field: { title: "estimated field E (V/nm)", of: (p) => p.field_V_per_nm, hover: "E = %{x:.3f} V/nm" },
  distance: { title: "estimated tip–sample distance d (nm)", of: (p) => p.distance_nm, hover: "d = %{x:.3f} nm" },
  conductance: {
    title: "setpoint conductance |I/V| (S)",
    type: "log",
    of: (p) => p.setpointConductance_S,
    hover: "G = %{x:.3e} S",
  },
};

export interface Theory {
  on: boolean;
  lambda_meV: string;
  ell_A: string;
}

type Trace = Record<string, unknown>;

/** The fitted curve with its 95% band (field mode, when there is a fit). */
function fitTraces(c: PhaseData["crossing"]): Trace[] {
  if (!("curve" in c && c.curve && c.state !== "none")) return [];
  const meV = (v: number[]) => v.map((x) => x * 1000);
  const edge = { type: "scatter", mode: "lines", line: { width: 0 }, hoverinfo: "skip" };
  return [
    { ...edge, x: c.curve.field, y: meV(c.curve.hi), showlegend: false },
    {
      ...edge,
      x: c.curve.field,
      y: meV(c.curve.lo.map((v: number) => Math.max(0, v))),
      fill: "tonexty",
      fillcolor: PHASE_LOOK.band,
      name: "95% band",
    },
    {
      type: "scatter",
      mode: "lines",
      x: c.curve.field,
      y: meV(c.curve.gap),
      line: { color: PHASE_LOOK.fit, width: 2 },
      name: c.state === "crossed" ? "fit: closes and reopens" : "fit: closing",
      hoverinfo: "skip",
    },
  ];
}

/** The point series of one region: in the fit, corrected, and (when shown) excluded and flagged-out. */
function regionGroups(
  points: readonly PhasePoint[],
  region: string | null,
  name: string,
  color: string,
  showExcluded: boolean,
) {
  const mine = points.filter((p) => regionOf(p) === region);
  return [
    {
      name,
      pts: mine.filter((p) => !outOfFit(p) && p.source === "auto"),
      marker: { symbol: "circle", size: 7, color },
    },
    {
      name: `${name} · corrected`,
      pts: mine.filter((p) => !p.excluded && p.source === "corrected"),
      marker: { symbol: "diamond", size: 9, color, line: { color: "#1c2430", width: 1 } },
    },
    ...(showExcluded
      ? [
          {
            name: `${name} · excluded`,
            pts: mine.filter((p) => p.excluded),
            marker: { symbol: "x-open", size: 8, color: PHASE_LOOK.excluded },
          },
          // Open circles: automatic picks the lab's setting keeps out of the fit for their flags.
          {
            name: `${name} · flagged, not in the fit`,
            pts: mine.filter((p) => p.excludedByFlag),
            marker: { symbol: "circle-open", size: 8, color, line: { color, width: 1.5 } },
          },
        ]
      : []),
  ];
}

/** The theory overlay Δ = 2|λ − ℓeE| over the points' field range, or nothing when its numbers are not positive. */
function theoryTrace(points: readonly PhasePoint[], theory: Theory): Trace[] {
  const lambda = Number(theory.lambda_meV) / 1000;
  const ell_nm = Number(theory.ell_A) / 10;
  if (!(lambda > 0 && ell_nm > 0)) return [];
  const hi = Math.max(2 * (lambda / ell_nm), ...points.map((p) => p.field_V_per_nm), 0.1);
  const grid = Array.from({ length: 201 }, (_, i) => (hi * 1.1 * i) / 200);
  return [
    {
      x: grid,
      y: grid.map((E) => 2 * Math.abs(lambda - ell_nm * E) * 1000),
      type: "scatter",
      mode: "lines",
      line: { color: "#5b4b8a", dash: "dash", width: 1.5 },
      name: `theory: Δ = 2|λ − ℓeE| (λ ${theory.lambda_meV} meV, ℓ ${theory.ell_A} Å)`,
    },
  ];
}

/** The critical field: its two intervals as bands, a dotted line and the E_c label above the plot. */
function criticalField(c: PhaseData["crossing"]): { shapes: Trace[]; annotations: Trace[] } {
  if (c.state !== "crossed" || c.field_V_per_nm == null) return { shapes: [], annotations: [] };
  const band = (iv: [number, number], fillcolor: string) => ({
    type: "rect",
    xref: "x",
    yref: "paper",
    x0: iv[0],
    x1: iv[1],
    y0: 0,
    y1: 1,
    fillcolor,
    line: { width: 0 },
    layer: "below",
  });
  const stat = "ci95Statistical_V_per_nm" in c ? c.ci95Statistical_V_per_nm : null;
  return {
    // Light: the interval with the field model's common uncertainty; darker: from the points' scatter alone.
    shapes: [
      ...(c.ci95_V_per_nm ? [band(c.ci95_V_per_nm, PHASE_LOOK.ciModel)] : []),
      ...(stat ? [band(stat, PHASE_LOOK.ciStatistical)] : []),
      {
        type: "line",
        xref: "x",
        yref: "paper",
        x0: c.field_V_per_nm,
        x1: c.field_V_per_nm,
        y0: 0,
        y1: 1,
        line: { color: PHASE_LOOK.fit, width: 1.5, dash: "dot" },
      },
    ],
    annotations: [
      {
        x: c.field_V_per_nm,
        y: 1,
        xref: "x",
        yref: "paper",
        yanchor: "bottom",
        text: `E<sub>c</sub> = ${c.field_V_per_nm.toFixed(3)} V/nm`,
        showarrow: false,
        font: { color: PHASE_LOOK.fit, size: 12 },
      },
    ],
  };
}

/**
 * The phase plot's figure: gap versus the chosen x, the points by region with their gap's error
 * bars (SVG paths under WebGL markers), rings on flagged picks, and in field mode the fit with its
 * band, the critical field, the field model's one bar and the theory overlay.
 */
export function phaseFigure(
  data: PhaseData,
  o: { mode: XMode; showExcluded: boolean; theory: Theory; narrow: boolean; sampleId: string },
) {
  const x = X_AXIS[o.mode];
  const field = o.mode === "field";
  // Field mode has fixed ranges, shared with the still preview; the other modes autorange.
  const ranges = field ? fieldModeRanges(data, o.showExcluded) : null;
  const type = data.points.length >= WEBGL_FROM ? "scattergl" : "scatter";
  const traces: Trace[] = field ? fitTraces(data.crossing) : [];
  const shapes: Trace[] = [];
  for (const { region, name, color } of regionColors(data.points)) {
    for (const g of regionGroups(data.points, region, name, color, o.showExcluded)) {
      const pts = g.pts.filter((p) => x.of(p) != null);
      if (!pts.length) continue;
      const xs = pts.map((p) => x.of(p)!);
      const ys = pts.map((p) => p.gap_eV * 1000);
      const sy = pts.map((p) => (p.gapSigma_eV ?? 0) * 1000);
      let errorBars: Trace = {
        error_y: { type: "data", array: sy, visible: true, thickness: 1, width: 2, color: g.marker.color },
      };
      if (type === "scattergl") {
        // Under WebGL markers the gap bars are an SVG path below the canvas (gapErrorBarShape).
        const vertical = errorBarPaths(xs.map((v, i) => ({ x: v, y: ys[i], sy: sy[i] }))).vertical;
        if (vertical) shapes.push(gapErrorBarShape(vertical, g.marker.color as string, g.name));
        errorBars = { legendgroup: g.name };
      }
      traces.push({
        type,
        mode: "markers",
        name: g.name,
        x: xs,
        y: ys,
        customdata: pts.map((p) => p.spectrumId),
        marker: g.marker,
        ...errorBars,
        hovertemplate: `${x.hover}<br>gap = %{y:.1f} meV<extra>${g.name}</extra>`,
      });
    }
  }
  const shown = o.showExcluded ? data.points : data.points.filter((p) => !outOfFit(p));
  const rings = flagRingTrace(shown, x.of, type);
  if (rings) traces.push(rings);
  const annotations: Trace[] = [];
  const bar = field ? fieldModelBar(shown) : null;
  if (bar) {
    const { shape, annotation } = fieldModelBarShapes(bar);
    shapes.push(shape);
    // On a phone the words would run over the plot's edge: the legend entry says them.
    if (!o.narrow) annotations.push(annotation);
  }
  if (field && o.theory.on) traces.push(...theoryTrace(data.points, o.theory));
  const ec = field ? criticalField(data.crossing) : { shapes: [], annotations: [] };
  shapes.push(...ec.shapes);
  annotations.push(...ec.annotations);
  const legendRoom = narrowLegendRoom(legendEntries(traces, shapes));
  return {
    ranges,
    legendRoom,
    data: traces,
    layout: baseLayout({
      xaxis: axis(x.title, {
        ...(x.type ? { type: x.type } : {}),
        ...(ranges ? { range: ranges.x, autorange: false } : {}),
      }),
      yaxis: axis("band gap (meV)", ranges ? { range: ranges.y, autorange: false } : { rangemode: "tozero" }),
      shapes,
      annotations,
      margin: phaseMargin(o.narrow, ec.annotations.length > 0, legendRoom),
      ...(o.narrow ? { legend: NARROW_LEGEND, meta: { legendRoom } } : {}),
      uirevision: `${o.sampleId}-${o.mode}`,
    }),
  };
}
