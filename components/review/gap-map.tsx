"use client";

import { useQuery } from "@tanstack/react-query";
import { useRouter } from "next/navigation";
import { useMemo, useState } from "react";
import { axis, baseLayout, Plot } from "@/components/plots/plot";
import { api } from "@/lib/api-client";
import { queryKeys } from "@/lib/query-keys";
import { fileStem } from "@/lib/format";
import type { getGapMap } from "@/lib/services/spectra/gapMap";

type MapData = Awaited<ReturnType<typeof getGapMap>>;

/**
 * The gap as a map over tip position for a grid upload. Cells without a gap (metallic, excluded)
 * are left empty; clicking a cell opens that spectrum.
 */
/** Plot margins, the plot area's height in a 380 px box, and the room the colour bar takes. */
const MAP_MARGIN = { l: 56, r: 16, t: 12, b: 48 };
const MAP_AREA_PX = 380 - MAP_MARGIN.t - MAP_MARGIN.b;
const COLOR_BAR_PX = 110;

export function GapMap({ lab, sampleId, initial }: { lab: string; sampleId: string; initial: MapData }) {
  const router = useRouter();
  const [uploadId, setUploadId] = useState(initial.uploadId);
  const { data = initial } = useQuery({
    queryKey: queryKeys.sampleMap(sampleId, uploadId),
    queryFn: () => api<MapData>(lab, "GET", `/samples/${sampleId}/map${uploadId ? `?uploadId=${uploadId}` : ""}`),
    initialData: uploadId === initial.uploadId ? initial : undefined,
  });
  const fig = useMemo(() => {
    const xs = [...new Set(data.cells.map((c) => c.x_nm))].sort((a, b) => a - b);
    const ys = [...new Set(data.cells.map((c) => c.y_nm))].sort((a, b) => a - b);
    const xi = new Map(xs.map((v, i) => [v, i]));
    const yi = new Map(ys.map((v, i) => [v, i]));
    const z: (number | null)[][] = ys.map(() => xs.map(() => null));
    const ids: (string | null)[][] = ys.map(() => xs.map(() => null));
    for (const c of data.cells) {
      z[yi.get(c.y_nm)!][xi.get(c.x_nm)!] = c.gap_eV == null ? null : c.gap_eV * 1000;
      ids[yi.get(c.y_nm)!][xi.get(c.x_nm)!] = c.id;
    }
    const regular = xs.length * ys.length <= data.cells.length * 1.05;
    const trace = regular
      ? { type: "heatmap", x: xs, y: ys, z, customdata: ids, colorscale: [[0, "#16323a"], [0.5, "#1f6b73"], [0.8, "#e0b589"], [1, "#b9512a"]], colorbar: { title: { text: "gap (meV)" } }, hovertemplate: "x %{x:.2f} nm, y %{y:.2f} nm<br>gap %{z:.1f} meV<extra></extra>", hoverongaps: false }
      : { type: "scatter", mode: "markers", x: data.cells.map((c) => c.x_nm), y: data.cells.map((c) => c.y_nm), customdata: data.cells.map((c) => c.id), marker: { symbol: "square", size: 9, color: data.cells.map((c) => (c.gap_eV == null ? null : c.gap_eV * 1000)), colorscale: "Cividis", showscale: true, colorbar: { title: { text: "gap (meV)" } } } };
    // Wide enough for the map at its true aspect (equal nm per pixel both ways) and its colour
    // bar beside it, no wider: in a full-width box the bar stood far from a square map.
    const span = (v: number[]) => (v.length > 1 ? ((v[v.length - 1] - v[0]) * v.length) / (v.length - 1) : 1);
    const aspect = span(xs) / span(ys) || 1;
    const width = Math.round(MAP_AREA_PX * aspect) + MAP_MARGIN.l + MAP_MARGIN.r + COLOR_BAR_PX;
    return { width, data: [trace], layout: baseLayout({ xaxis: axis("x (nm)", { constrain: "domain" }), yaxis: axis("y (nm)", { scaleanchor: "x" }), margin: MAP_MARGIN }) };
  }, [data]);
  if (!data.grids.length) return null;
  return (
    <div className="space-y-2" data-testid="gap-map">
      {data.grids.length > 1 ? (
        <select aria-label="Grid file" value={uploadId ?? ""} onChange={(e) => setUploadId(e.target.value)} className="rounded-md border border-line bg-white px-2 py-1 text-sm">
          {data.grids.map((g) => (
            <option key={g.id} value={g.id}>
              {g.fileName} ({g.n} spectra)
            </option>
          ))}
        </select>
      ) : (
        <p className="text-xs text-muted">{data.grids[0].fileName} · {data.cells.length} spectra · empty cells: no gap or excluded</p>
      )}
      <div className="mx-auto h-[380px] max-w-full" style={{ width: fig.width }}>
        <Plot
          data={fig.data}
          layout={fig.layout}
          config={{ displaylogo: false, toImageButtonOptions: { filename: fileStem(`gap map ${(data.grids.find((g) => g.id === uploadId) ?? data.grids[0]).fileName.replace(/\.[^.]+$/, "")}`) } }}
          style={{ width: "100%", height: "100%" }}
          onClick={(e: { points?: { customdata?: string | null }[] }) => {
            const id = e.points?.[0]?.customdata;
            if (typeof id === "string") router.push(`/labs/${lab}/spectra/${id}`);
          }}
        />
      </div>
    </div>
  );
}
