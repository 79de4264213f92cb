"use client";

import { useQueries } from "@tanstack/react-query";
import { useMemo, useState } from "react";
import { axis, baseLayout, COLORS, Plot } from "@/components/plots/plot";
import { api } from "@/lib/api-client";
import { fileStem, formatField } from "@/lib/format";
import { queryKeys } from "@/lib/query-keys";
import { errorBarPaths, gapErrorBarShape, WEBGL_FROM, outOfFit } from "./phase-figure";
import type { PhaseData } from "./phase-plot";

/** Phase plots of several samples, or of the regions of one, overlaid on one field axis. */
export function ComparePlot({
  lab,
  samples,
}: {
  lab: string;
  samples: { id: string; name: string; spectraCount: number }[];
}) {
  const [chosen, setChosen] = useState<string[]>(
    samples
      .filter((s) => s.spectraCount > 0)
      .slice(0, 3)
      .map((s) => s.id),
  );
  const [byRegion, setByRegion] = useState(false);
  const results = useQueries({
    queries: chosen.map((id) => ({
      queryKey: queryKeys.phase(id),
      queryFn: () => api<PhaseData>(lab, "GET", `/samples/${id}/phase`),
    })),
  });
  const loaded = results.map((r) => r.data).filter((d): d is PhaseData => Boolean(d));
  const figure = useMemo(() => {
    const traces: Record<string, unknown>[] = [];
    const shapes: Record<string, unknown>[] = [];
    let k = 0;
    for (const d of loaded) {
      const groups = byRegion
        ? [...new Set(d.points.map((p) => p.region ?? "no region"))].map((r) => ({
            name: `${d.sample.name} · ${r}`,
            pts: d.points.filter((p) => (p.region ?? "no region") === r),
          }))
        : [{ name: d.sample.name, pts: d.points }];
      for (const g of groups) {
        const color = COLORS[k++ % COLORS.length];
        // The points of each sample's fit: excluded by hand or for their flags (lab setting) stay out.
        const pts = g.pts.filter((p) => !outOfFit(p));
        const x = pts.map((p) => p.field_V_per_nm);
        const y = pts.map((p) => p.gap_eV * 1000);
        const sy = pts.map((p) => (p.gapSigma_eV ?? 0) * 1000);
        const gl = pts.length >= WEBGL_FROM;
        // As on the phase plot: WebGL series get their error bars as an SVG path in their legend group.
        const bars = gl ? errorBarPaths(x.map((v, i) => ({ x: v, y: y[i], sy: sy[i] }))).vertical : "";
        if (bars) shapes.push(gapErrorBarShape(bars, color, g.name));
        traces.push({
          type: gl ? "scattergl" : "scatter",
          mode: "markers",
          name: g.name,
          x,
          y,
          marker: { color, size: 6, symbol: "circle" },
          ...(gl ? { legendgroup: g.name } : { error_y: { type: "data", array: sy, thickness: 1, width: 0, color } }),
        });
        const c = d.crossing;
        if (!byRegion && "curve" in c && c.curve && c.state !== "none")
          traces.push({
            type: "scatter",
            mode: "lines",
            x: c.curve.field,
            y: c.curve.gap.map((v: number) => v * 1000),
            line: { color, width: 2 },
            name: `${d.sample.name} fit`,
            showlegend: false,
            hoverinfo: "skip",
          });
      }
    }
    return {
      data: traces,
      layout: baseLayout({
        xaxis: axis("estimated field E (V/nm)"),
        yaxis: axis("band gap (meV)", { rangemode: "tozero" }),
        shapes,
      }),
    };
  }, [loaded, byRegion]);
  return (
    <div className="grid grid-cols-1 gap-5 lg:grid-cols-[240px_minmax(0,1fr)]">
      <fieldset className="space-y-1.5 text-sm" aria-label="Samples to compare">
        <legend className="mb-2 text-xs font-semibold uppercase tracking-wide text-muted">Samples</legend>
        {samples.map((s) => (
          <label key={s.id} className="flex items-center gap-2">
            <input
              type="checkbox"
              checked={chosen.includes(s.id)}
              onChange={(e) => setChosen(e.target.checked ? [...chosen, s.id] : chosen.filter((x) => x !== s.id))}
            />
            <span>{s.name}</span>
            <span className="num text-xs text-muted">{s.spectraCount}</span>
          </label>
        ))}
        <label className="mt-3 flex items-center gap-2 border-t border-line pt-3 text-xs text-ink-soft">
          <input type="checkbox" checked={byRegion} onChange={(e) => setByRegion(e.target.checked)} /> split by region /
          layer
        </label>
      </fieldset>
      <div>
        <div className="h-[460px] rounded-xl border border-line bg-card p-2" data-testid="compare-plot">
          {loaded.length ? (
            <Plot
              data={figure.data}
              layout={figure.layout}
              config={{
                displaylogo: false,
                toImageButtonOptions: { filename: fileStem(`compare ${loaded.map((d) => d.sample.name).join(" ")}`) },
              }}
              style={{ width: "100%", height: "100%" }}
            />
          ) : (
            <p className="p-6 text-sm text-muted">Choose samples with spectra to overlay their phase plots.</p>
          )}
        </div>
        <table className="mt-3 w-full text-sm">
          <tbody>
            {loaded.map((d) => (
              <tr key={d.sample.id} className="border-b border-line/70">
                <td className="py-1.5 font-medium">{d.sample.name}</td>
                <td className="py-1.5 text-ink-soft">{d.crossing.state}</td>
                <td className="num py-1.5">
                  {d.crossing.state === "crossed" ? formatField(d.crossing.field_V_per_nm) : "—"}
                </td>
                <td className="num py-1.5 text-xs text-muted">
                  {d.crossing.ci95_V_per_nm
                    ? `[${d.crossing.ci95_V_per_nm[0].toFixed(2)}, ${d.crossing.ci95_V_per_nm[1].toFixed(2)}]`
                    : ""}
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </div>
  );
}
