"use client";

import { useRouter } from "next/navigation";
import { useMemo, useRef, useState, useSyncExternalStore } from "react";
import { axis, baseLayout, downloadFigure, Plot } from "@/components/plots/plot";
import { errorBarPaths, fieldErrorBarShape, flagRingTrace, gapErrorBarShape, fieldModeRanges, outOfFit, NARROW_QUERY, PHASE_LOOK, phaseCounts, phaseMargin, type PhaseData, regionColors, regionOf, WEBGL_FROM } from "./phase-figure";
import { type PackedPhase, unpackPhase } from "./phase-pack";
import { PhasePreview } from "./phase-preview";
import { usePhase } from "./sample-queries";
import { fileStem } from "@/lib/format";

export type { PhaseData };

/**
 * How to read the plot, under it: how many points are automatic picks, corrected by an analyst or
 * excluded, each with the marker shape it has on the plot, how many carry a quality flag (ringed)
 * and how many the lab's setting left out of the fit for that, how many automatic picks an analyst
 * accepted as they are, and what a click does.
 */
function PhaseKey({ points }: { points: PhaseData["points"] }) {
  const { auto, corrected, excluded, excludedByFlag, flagged, accepted } = phaseCounts(points);
  return (
    <dl className="flex flex-wrap gap-x-5 gap-y-1 border-t border-line pt-3 text-xs text-ink-soft" data-testid="phase-key">
      <div className="inline-flex items-center gap-1.5">
        <dt><span aria-hidden>●</span> automatic picks</dt>
        <dd className="num text-ink">{auto}</dd>
      </div>
      <div className="inline-flex items-center gap-1.5">
        <dt><span aria-hidden>◆</span> corrected by an analyst</dt>
        <dd className="num text-ink">{corrected}</dd>
      </div>
      <div className="inline-flex items-center gap-1.5">
        <dt><span aria-hidden>✕</span> excluded (not in the fit)</dt>
        <dd className="num text-ink">{excluded}</dd>
      </div>
      <div className="inline-flex items-center gap-1.5" data-testid="phase-key-flagged" title="A ring marks a pick with a quality flag: a reason it may not be trusted. Open the spectrum to read why.">
        <dt>
          <span aria-hidden className="inline-block h-3 w-3 translate-y-0.5 rounded-full border-[1.5px]" style={{ borderColor: PHASE_LOOK.flagRing }} /> ringed: flagged
        </dt>
        <dd className="num text-ink">{flagged}</dd>
      </div>
      {excludedByFlag ? (
        <div className="inline-flex items-center gap-1.5" data-testid="phase-key-flagged-out">
          <dt><span aria-hidden>○</span> flagged, left out of the fit (lab setting)</dt>
          <dd className="num text-ink">{excludedByFlag}</dd>
        </div>
      ) : null}
      <div className="inline-flex items-center gap-1.5">
        <dt><span aria-hidden>✓</span> of the automatic picks, accepted by an analyst</dt>
        <dd className="num text-ink" data-testid="phase-key-accepted">{accepted}</dd>
      </div>
      <p className="basis-full text-muted">Click a point to open its spectrum. The field axis is a model estimate: its assumptions are beside the plot.</p>
    </dl>
  );
}
/** Whether the screen matches a media query (false on the server and while hydrating). */
function useMedia(query: string): boolean {
  return useSyncExternalStore(
    (changed) => {
      const list = window.matchMedia(query);
      list.addEventListener("change", changed);
      return () => list.removeEventListener("change", changed);
    },
    () => window.matchMedia(query).matches,
    () => false,
  );
}

type XMode = "field" | "distance" | "conductance";

const X_AXIS: Record<XMode, { title: string; type?: "log"; of: (p: PhaseData["points"][number]) => number | null; sigma?: (p: PhaseData["points"][number]) => number | null }> = {
  field: { title: "estimated field E (V/nm)", of: (p) => p.field_V_per_nm, sigma: (p) => p.fieldSigma_V_per_nm },
  distance: { title: "estimated tip–sample distance d (nm)", of: (p) => p.distance_nm },
  conductance: { title: "setpoint conductance |I/V| (S)", type: "log", of: (p) => p.setpointConductance_S },
};

/**
 * Gap versus estimated field: error bars both ways, one series per region, corrected picks as
 * diamonds and excluded spectra as open crosses (shape, not only colour), the fitted V with its
 * 95% band, the critical field with its interval, and an optional theory overlay. Clicking a point
 * opens that spectrum.
 */
export function PhasePlot({ lab, sampleId, initial: packed }: { lab: string; sampleId: string; initial: PackedPhase }) {
  const router = useRouter();
  const [mode, setMode] = useState<XMode>("field");
  const [showExcluded, setShowExcluded] = useState(true);
  const [theory, setTheory] = useState({ on: false, lambda_meV: "43", ell_A: "0.33" });
  const graph = useRef<HTMLElement | null>(null);
  const initial = useMemo(() => unpackPhase(packed), [packed]);
  const narrow = useMedia(NARROW_QUERY);
  const { data = initial, isFetching, isError, refetch } = usePhase(lab, sampleId, initial);
  const filename = fileStem(`${data.sample.name} phase`);
  const download = (format: "png" | "svg") => {
    if (graph.current) void downloadFigure(graph.current, { format, filename, width: 1200, height: 800 });
  };

  const figure = useMemo(() => {
    const x = X_AXIS[mode];
    // Field mode has fixed ranges, shared with the still preview; the other modes autorange.
    const ranges = mode === "field" ? fieldModeRanges(data, showExcluded) : null;
    const gl = data.points.length >= WEBGL_FROM;
    const type = gl ? "scattergl" : "scatter";
    const traces: Record<string, unknown>[] = [];
    const c = data.crossing;
    if (mode === "field" && "curve" in c && c.curve && c.state !== "none") {
      traces.push({ x: c.curve.field, y: c.curve.hi.map((v: number) => v * 1000), type: "scatter", mode: "lines", line: { width: 0 }, hoverinfo: "skip", showlegend: false });
      traces.push({ x: c.curve.field, y: c.curve.lo.map((v: number) => Math.max(0, v) * 1000), type: "scatter", mode: "lines", line: { width: 0 }, fill: "tonexty", fillcolor: PHASE_LOOK.band, name: "95% band", hoverinfo: "skip" });
      traces.push({ x: c.curve.field, y: c.curve.gap.map((v: number) => v * 1000), type: "scatter", mode: "lines", line: { color: PHASE_LOOK.fit, width: 2 }, name: c.state === "crossed" ? "fit: closes and reopens" : "fit: closing", hoverinfo: "skip" });
    }
    const shapes: Record<string, unknown>[] = [];
    let fieldBars = "";
    for (const { region, name, color } of regionColors(data.points)) {
      const groups: { name: string; pts: PhaseData["points"]; marker: Record<string, unknown> }[] = [
        { name, pts: data.points.filter((p) => regionOf(p) === region && !outOfFit(p) && p.source === "auto"), marker: { symbol: "circle", size: 7, color } },
        { name: `${name} · corrected`, pts: data.points.filter((p) => regionOf(p) === region && !p.excluded && p.source === "corrected"), marker: { symbol: "diamond", size: 9, color, line: { color: "#1c2430", width: 1 } } },
        ...(showExcluded
          ? [
              { name: `${name} · excluded`, pts: data.points.filter((p) => regionOf(p) === region && p.excluded), marker: { symbol: "x-open", size: 8, color: PHASE_LOOK.excluded } },
              // Open circles: automatic picks the lab's setting keeps out of the fit for their flags.
              { name: `${name} · flagged, not in the fit`, pts: data.points.filter((p) => regionOf(p) === region && p.excludedByFlag), marker: { symbol: "circle-open", size: 8, color, line: { color, width: 1.5 } } },
            ]
          : []),
      ];
      for (const g of groups) {
        const pts = g.pts.filter((p) => x.of(p) != null);
        if (!pts.length) continue;
        const xs = pts.map((p) => x.of(p)!);
        const ys = pts.map((p) => p.gap_eV * 1000);
        const sy = pts.map((p) => (p.gapSigma_eV ?? 0) * 1000);
        const sx = x.sigma ? pts.map((p) => x.sigma!(p) ?? 0) : null;
        const paths = errorBarPaths(xs.map((v, i) => ({ x: v, y: ys[i], sx: sx?.[i], sy: sy[i] })));
        // Field bars of all series go in one shape with a legend entry of its own (below).
        fieldBars += paths.horizontal;
        let errorBars: Record<string, unknown> = { error_y: { type: "data", array: sy, visible: true, thickness: 1, width: 2, color: g.marker.color } };
        if (gl) {
          // Under WebGL markers the gap bars are an SVG path below the canvas (gapErrorBarShape).
          if (paths.vertical) shapes.push(gapErrorBarShape(paths.vertical, g.marker.color as string, g.name));
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
          hovertemplate: `${mode === "field" ? "E = %{x:.3f} V/nm" : mode === "distance" ? "d = %{x:.3f} nm" : "G = %{x:.3e} S"}<br>gap = %{y:.1f} meV<extra>${g.name}</extra>`,
        });
      }
    }
    const rings = flagRingTrace(showExcluded ? data.points : data.points.filter((p) => !outOfFit(p)), x.of, type);
    if (rings) traces.push(rings);
    if (fieldBars) shapes.push(fieldErrorBarShape(fieldBars, data.points.length));
    if (mode === "field" && theory.on) {
      const lambda = Number(theory.lambda_meV) / 1000;
      const ell_nm = Number(theory.ell_A) / 10;
      if (lambda > 0 && ell_nm > 0) {
        const xs = data.points.map((p) => p.field_V_per_nm);
        const hi = Math.max(2 * (lambda / ell_nm), ...xs, 0.1);
        const grid = Array.from({ length: 201 }, (_, i) => (hi * 1.1 * i) / 200);
        traces.push({ x: grid, y: grid.map((E) => 2 * Math.abs(lambda - ell_nm * E) * 1000), type: "scatter", mode: "lines", line: { color: "#5b4b8a", dash: "dash", width: 1.5 }, name: `theory: Δ = 2|λ − ℓeE| (λ ${theory.lambda_meV} meV, ℓ ${theory.ell_A} Å)` });
      }
    }
    const annotations: Record<string, unknown>[] = [];
    if (mode === "field" && c.state === "crossed" && c.field_V_per_nm != null) {
      // Light: the interval with the field model's common uncertainty; darker: from the points' scatter alone.
      if (c.ci95_V_per_nm) shapes.push({ type: "rect", xref: "x", yref: "paper", x0: c.ci95_V_per_nm[0], x1: c.ci95_V_per_nm[1], y0: 0, y1: 1, fillcolor: PHASE_LOOK.ciModel, line: { width: 0 }, layer: "below" });
      const stat = "ci95Statistical_V_per_nm" in c ? c.ci95Statistical_V_per_nm : null;
      if (stat) shapes.push({ type: "rect", xref: "x", yref: "paper", x0: stat[0], x1: stat[1], y0: 0, y1: 1, fillcolor: PHASE_LOOK.ciStatistical, line: { width: 0 }, layer: "below" });
      shapes.push({ type: "line", xref: "x", yref: "paper", x0: c.field_V_per_nm, x1: c.field_V_per_nm, y0: 0, y1: 1, line: { color: PHASE_LOOK.fit, width: 1.5, dash: "dot" } });
      annotations.push({ x: c.field_V_per_nm, y: 1, xref: "x", yref: "paper", yanchor: "bottom", text: `E<sub>c</sub> = ${c.field_V_per_nm.toFixed(3)} V/nm`, showarrow: false, font: { color: PHASE_LOOK.fit, size: 12 } });
    }
    return {
      ranges,
      data: traces,
      layout: baseLayout({
        xaxis: axis(x.title, { ...(x.type ? { type: x.type } : {}), ...(ranges ? { range: ranges.x, autorange: false } : {}) }),
        yaxis: axis("band gap (meV)", ranges ? { range: ranges.y, autorange: false } : { rangemode: "tozero" }),
        shapes,
        annotations,
        margin: phaseMargin(narrow, annotations.length > 0),
        uirevision: `${sampleId}-${mode}`,
      }),
    };
  }, [data, mode, showExcluded, theory, sampleId, narrow]);

  return (
    <div className="space-y-3" data-testid="phase-plot" data-points={data.points.length} data-state={data.crossing.state}>
      <div className="flex flex-wrap items-center gap-3 text-sm">
        <div role="radiogroup" aria-label="x axis" className="inline-flex rounded-md border border-line bg-white p-0.5">
          {(["field", "distance", "conductance"] as XMode[]).map((m) => (
            <button key={m} type="button" role="radio" aria-checked={mode === m} onClick={() => setMode(m)} className={`rounded px-2.5 py-1 text-xs font-medium ${mode === m ? "bg-ink text-white" : "text-ink-soft hover:bg-paper"}`}>
              {m === "field" ? "Field" : m === "distance" ? "Distance" : "Setpoint conductance"}
            </button>
          ))}
        </div>
        <label className="inline-flex items-center gap-1.5 text-xs text-ink-soft">
          <input type="checkbox" checked={showExcluded} onChange={(e) => setShowExcluded(e.target.checked)} /> show excluded
        </label>
        <details className="text-xs text-ink-soft">
          <summary className="cursor-pointer select-none">Theory overlay</summary>
          <div className="mt-2 flex flex-wrap items-end gap-2 rounded-md border border-line bg-white p-2">
            <label className="inline-flex items-center gap-1.5">
              <input type="checkbox" checked={theory.on} onChange={(e) => setTheory({ ...theory, on: e.target.checked })} /> Δ(E) = 2|λ<sub>SO</sub> − ℓeE|
            </label>
            <label>
              λ<sub>SO</sub> (meV) <input className="num ml-1 w-16 rounded border border-line px-1" value={theory.lambda_meV} onChange={(e) => setTheory({ ...theory, lambda_meV: e.target.value })} />
            </label>
            <label>
              ℓ (Å) <input className="num ml-1 w-16 rounded border border-line px-1" value={theory.ell_A} onChange={(e) => setTheory({ ...theory, ell_A: e.target.value })} />
            </label>
            <span className="text-muted">buckled-honeycomb model; e.g. germanene λ ≈ 43 meV, ℓ ≈ 0.33 Å (published estimates, from memory) → E<sub>c</sub> = λ/ℓ</span>
          </div>
        </details>
        <span className="ml-auto flex items-center gap-2 text-xs text-muted">
          {isFetching ? "updating…" : `${data.points.length} spectra`}
          {data.points.length ? (
            <>
              <button type="button" className="rounded border border-line bg-white px-2 py-0.5 hover:border-ink-soft" onClick={() => download("png")}>
                PNG
              </button>
              <button type="button" className="rounded border border-line bg-white px-2 py-0.5 hover:border-ink-soft" onClick={() => download("svg")}>
                SVG
              </button>
            </>
          ) : null}
        </span>
      </div>
      {isError ? (
        <p className="text-sm text-danger">
          The phase data could not be refreshed.{" "}
          <button className="underline" type="button" onClick={() => refetch()}>
            Retry
          </button>
        </p>
      ) : null}
      {data.points.length === 0 ? (
        <div className="flex h-72 items-center justify-center rounded-lg border border-dashed border-line text-sm text-muted">
          No spectra with a gap and a field yet: upload a session&apos;s spectra, and tag setpoints where the files lack them.
        </div>
      ) : (
        <div className="h-[440px] w-full">
          <Plot
            data={figure.data}
            layout={figure.layout}
            config={{ displaylogo: false, toImageButtonOptions: { filename } }}
            style={{ width: "100%", height: "100%" }}
            // Until Plotly has drawn, a still drawing of the same figure stands in its place.
            placeholder={figure.ranges ? <PhasePreview data={data} showExcluded={showExcluded} ranges={figure.ranges} /> : undefined}
            onInitialized={(_f, gd) => (graph.current = gd)}
            onUpdate={(_f, gd) => (graph.current = gd)}
            onClick={(e: { points?: { customdata?: string }[] }) => {
              const id = e.points?.[0]?.customdata;
              if (typeof id === "string") router.push(`/labs/${lab}/spectra/${id}`);
            }}
          />
        </div>
      )}
      {data.points.length ? <PhaseKey points={data.points} /> : null}
    </div>
  );
}
