"use client";

import { useQuery } from "@tanstack/react-query";
import { useRouter } from "next/navigation";
import { useMemo, useState } from "react";
import { axis, baseLayout, Plot } from "@/components/plots/plot";
import { api } from "@/lib/api-client";
import { fileStem } from "@/lib/format";
import type { getGapMap } from "@/lib/services/spectra/gapMap";

type MapData = Awaited<ReturnType<typeof getGapMap>>;

/**
 * The gap as a map over tip position for a grid upload. Cells without a gap (metallic, excluded)
 * are left empty; clicking a cell opens that spectrum.
 */
export function GapMap({ lab, sampleId, initial }: { lab: string; sampleId: string; initial: MapData }) {
  const router = useRouter();
  const [uploadId, setUploadId] = useState(initial.uploadId);
  const { data = initial } = useQuery({
    queryKey: ["sample", sampleId, "map", uploadId],
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
    return { data: [trace], layout: baseLayout({ xaxis: axis("x (nm)", { constrain: "domain" }), yaxis: axis("y (nm)", { scaleanchor: "x" }), margin: { l: 56, r: 16, t: 12, b: 48 } }) };
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
      <div className="h-[380px]">
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
