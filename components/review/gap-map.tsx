"use client";

import { useQuery } from "@tanstack/react-query";
import { useRouter } from "next/navigation";
import { useMemo, useState } from "react";
import { Plot } from "@/components/plots/plot";
import { clickedCell, gapMapFigure, type MapData } from "./gap-map-figure";
import { api } from "@/lib/api-client";
import { queryKeys } from "@/lib/query-keys";
import { fileStem } from "@/lib/format";

/**
 * The gap as a map over tip position for a grid upload (`gap-map-figure.ts`). Cells without a gap
 * (metallic, excluded) are left empty; hovering a cell gives its gap, position and file; clicking
 * it opens that spectrum.
 */
export function GapMap({ lab, sampleId, initial }: { lab: string; sampleId: string; initial: MapData }) {
  const router = useRouter();
  const [uploadId, setUploadId] = useState(initial.uploadId);
  const { data = initial } = useQuery({
    queryKey: queryKeys.sampleMap(sampleId, uploadId),
    queryFn: () => api<MapData>(lab, "GET", `/samples/${sampleId}/map${uploadId ? `?uploadId=${uploadId}` : ""}`),
    initialData: uploadId === initial.uploadId ? initial : undefined,
  });
  const fig = useMemo(() => gapMapFigure(data), [data]);
  if (!data.grids.length) return null;
  const shownGrid = data.grids.find((g) => g.id === uploadId) ?? data.grids[0];
  return (
    <div className="space-y-2" data-testid="gap-map">
      {data.grids.length > 1 ? (
        <select
          aria-label="Grid file"
          value={uploadId ?? ""}
          onChange={(e) => setUploadId(e.target.value)}
          className="rounded-md border border-line bg-white px-2 py-1 text-sm"
        >
          {data.grids.map((g) => (
            <option key={g.id} value={g.id}>
              {g.fileName} ({g.n} spectra)
            </option>
          ))}
        </select>
      ) : (
        <p className="text-xs text-muted">
          {data.grids[0].fileName} · {data.cells.length} spectra · empty cells: no gap or excluded
        </p>
      )}
      <div className="mx-auto h-[380px] max-w-full" style={{ width: fig.width }}>
        <Plot
          data={fig.data}
          layout={fig.layout}
          config={{
            displaylogo: false,
            toImageButtonOptions: {
              filename: fileStem(`gap map ${shownGrid.fileName.replace(/\.[^.]+$/, "")}`),
            },
          }}
          style={{ width: "100%", height: "100%" }}
          onClick={(e: { points?: { customdata?: unknown }[] }) => {
            const id = clickedCell(e.points?.[0]?.customdata);
            if (id) router.push(`/labs/${lab}/spectra/${id}`);
          }}
        />
      </div>
    </div>
  );
}
