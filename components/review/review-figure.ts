import { axis, baseLayout } from "@/components/plots/plot";
import type { getSpectrum } from "@/lib/services/spectra/getSpectrum";

export type SpectrumData = Awaited<ReturnType<typeof getSpectrum>>;
export type Edge = "valence" | "conduction";
/** Band edges as drawn or typed, V. */
export type Edges = { vb: number; cb: number };
/** What the review plot shows: raw dI/dV or one of the normalised views. */
export type ReviewView = "raw" | "feenstra" | "setpoint";

export const VIEW_AXIS: Record<ReviewView, string> = {
  raw: "dI/dV (as recorded)",
  feenstra: "(dI/dV)/(I/V)",
  setpoint: "dI/dV ÷ (I_set/V_set)",
};

/** The view the stored pick was made on, as the review plot names views. */
export function pickedView(data: SpectrumData): ReviewView {
  const m = data.analysis.pickedOn.method;
  return m === "none" ? "raw" : m;
}

/** The values and standard error shown in a view (null when the view cannot be made for this spectrum). */
export function viewValues(data: SpectrumData, view: ReviewView): { y: number[]; se: number[] | null } | null {
  if (view === "raw") return { y: data.arrays.didv, se: data.arrays.stderr };
  const v = data.analysis.views[view];
  return v.values ? { y: v.values, se: v.stderr } : null;
}

type Shape = Record<string, unknown>;

/**
 * The noise floor and threshold the edges were read against, dotted and dashed, each with its words:
 * lines across the plot for a flat floor, curves along the bias for a sloped or curved one (the picker's
 * baseline, and the threshold at its height above it), so the plot shows what the flags speak of.
 */
function levels(a: SpectrumData["analysis"], bias: number[]): { traces: Shape[]; shapes: Shape[]; annotations: Shape[] } {
  const line = (y: number, color: string, dash: string) => ({
    type: "line",
    xref: "paper",
    x0: 0,
    x1: 1,
    y0: y,
    y1: y,
    line: { color, width: 1, dash },
    editable: false,
  });
  const label = (y: number, text: string, color: string, right: boolean) => ({
    xref: "paper",
    x: right ? 1 : 0,
    y,
    xanchor: right ? "right" : "left",
    yanchor: right ? "bottom" : "top",
    text,
    showarrow: false,
    font: { size: 10, color },
  });
  const out = { traces: [] as Shape[], shapes: [] as Shape[], annotations: [] as Shape[] };
  if (a.baseline && a.baselineDegree && a.thresholdOffset != null && a.baseline.length === bias.length) {
    const last = bias.length - 1;
    const curve = (y: number[], text: string, color: string, dash: string, above: boolean) => {
      out.traces.push({ x: bias, y, type: "scatter", mode: "lines", line: { color, width: 1, dash }, hoverinfo: "skip", showlegend: false });
      out.annotations.push({ ...label(y[last], text, color, true), xref: "x", x: bias[last], yanchor: above ? "bottom" : "top" });
    };
    curve(a.baseline, "noise floor (sloped)", "#6e6a5f", "dot", false);
    curve(a.baseline.map((v) => v + a.thresholdOffset!), "threshold", "#b9512a", "dash", true);
    return out;
  }
  if (a.noiseFloor != null) {
    out.shapes.push(line(a.noiseFloor, "#6e6a5f", "dot"));
    out.annotations.push(label(a.noiseFloor, "noise floor", "#6e6a5f", false));
  }
  if (a.threshold != null) {
    out.shapes.push(line(a.threshold, "#b9512a", "dash"));
    out.annotations.push(label(a.threshold, "threshold", "#b9512a", true));
  }
  return out;
}

/**
 * The review plot of one spectrum: raw and smoothed dI/dV (linear or log), the noise floor and
 * threshold, and the two band edges as lines the analyst drags (the one the keys move solid, the
 * other dashed) over a light band between them. `edgeIndex` gives the edges' places among the
 * shapes, for reading a drag back (`draggedEdges`).
 */
export function reviewFigure(
  data: SpectrumData,
  o: {
    vb: number | null;
    cb: number | null;
    logY: boolean;
    canEdit: boolean;
    id: string;
    selected: Edge;
    view: ReviewView;
  },
) {
  const { vb, cb, canEdit, selected } = o;
  const b = data.arrays.bias_V;
  const a = data.analysis;
  const shown = viewValues(data, o.view) ?? viewValues(data, "raw")!;
  const view = viewValues(data, o.view) ? o.view : "raw";
  const traces: Shape[] = [
    {
      x: b,
      y: shown.y,
      type: "scatter",
      mode: "markers",
      marker: { size: 3, color: "#8a8478" },
      name: view === "raw" ? "raw dI/dV" : VIEW_AXIS[view],
    },
  ];
  // An average's standard error of the mean, as a band around it.
  if (shown.se) {
    const se = shown.se;
    traces.unshift(
      { x: b, y: shown.y.map((v, i) => v + se[i]), type: "scatter", mode: "lines", line: { width: 0 }, hoverinfo: "skip", showlegend: false },
      {
        x: b,
        y: shown.y.map((v, i) => v - se[i]),
        type: "scatter",
        mode: "lines",
        line: { width: 0 },
        fill: "tonexty",
        fillcolor: "rgba(31,107,115,0.18)",
        name: "± standard error",
        hoverinfo: "skip",
      },
    );
  }
  // The smoothed curve, floor and threshold belong to the view the pick was read on.
  const picked = view === pickedView(data);
  if (picked)
    traces.push({
      x: b,
      y: a.smoothed,
      type: "scatter",
      mode: "lines",
      line: { color: "#1f6b73", width: 2 },
      name: `smoothed (${a.smoothing})`,
    });
  const { traces: levelTraces, shapes, annotations } = picked
    ? levels(a, b)
    : { traces: [] as Shape[], shapes: [] as Shape[], annotations: [] as Shape[] };
  traces.push(...levelTraces);
  const edgeShape = (x: number, edge: Edge) => ({
    type: "line",
    yref: "paper",
    x0: x,
    x1: x,
    y0: 0,
    y1: 1,
    line: { color: "#b9512a", width: 3, dash: canEdit && edge !== selected ? "dash" : "solid" },
    editable: canEdit,
  });
  const edgeIndex: number[] = [];
  if (vb != null) {
    edgeIndex.push(shapes.length);
    shapes.push(edgeShape(vb, "valence"));
  }
  if (cb != null) {
    edgeIndex.push(shapes.length);
    shapes.push(edgeShape(cb, "conduction"));
  }
  if (vb != null && cb != null) {
    shapes.push({
      type: "rect",
      yref: "paper",
      x0: vb,
      x1: cb,
      y0: 0,
      y1: 1,
      fillcolor: "rgba(185,81,42,0.06)",
      line: { width: 0 },
      editable: false,
      layer: "below",
    });
  }
  return {
    data: traces,
    edgeIndex,
    layout: baseLayout({
      xaxis: axis("sample bias (V)"),
      yaxis: axis(VIEW_AXIS[view], o.logY ? { type: "log" } : {}),
      shapes,
      annotations,
      uirevision: `${o.id}-${o.logY}-${view}`,
      dragmode: "zoom",
    }),
  };
}

/** The edges after a drag (Plotly's relayout event), in order; null when the event moved no edge. */
export function draggedEdges(e: Record<string, number>, edgeIndex: number[], now: Edges): Edges | null {
  const [iv, ic] = edgeIndex;
  const nv = e[`shapes[${iv}].x0`];
  const nc = e[`shapes[${ic}].x0`];
  if (nv === undefined && nc === undefined) return null;
  const next = { vb: nv ?? now.vb, cb: nc ?? now.cb };
  return next.vb < next.cb ? next : { vb: next.cb, cb: next.vb };
}

/** The edges with the selected one moved by `mV`, inside the bias range and on its side of the other. */
export function movedEdge({ vb, cb }: Edges, selected: Edge, mV: number, range: [number, number]): Edges {
  const d = mV / 1000;
  const gapMin = 1e-4;
  return selected === "valence"
    ? { vb: Math.min(Math.max(vb + d, range[0]), cb - gapMin), cb }
    : { vb, cb: Math.max(Math.min(cb + d, range[1]), vb + gapMin) };
}
