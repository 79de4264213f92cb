"use client";

import { useMemo } from "react";
import { Plot } from "@/components/plots/plot";
import { gapHistogramFigure, gapSummary } from "./gap-histogram-figure";
import { type PhaseData } from "./phase-figure";
import { fieldModelBar } from "./field-model-bar";

/**
 * The gaps of a sample whose spectra all sit at one field (a grid at one setpoint), counted in
 * bins: plotted against the field they would be one column of points. The caption names the field
 * with its model uncertainty, the median gap and its spread, and points to the gap map, where the
 * same gaps are shown where they were measured.
 */
export function GapHistogram(props: {
  data: PhaseData;
  showExcluded: boolean;
  gapMap: boolean;
  filename: string;
  graph: { current: HTMLElement | null };
}) {
  const { data, showExcluded, gapMap, filename, graph } = props;
  const figure = useMemo(() => gapHistogramFigure(data.points, showExcluded), [data.points, showExcluded]);
  const { n, left, median_meV, spread_meV } = gapSummary(data.points);
  const field = data.sharedField!.field_V_per_nm;
  const bar = fieldModelBar(data.points);
  return (
    <div className="space-y-3" data-testid="gap-histogram">
      <p className="text-sm text-ink-soft">
        <span className="font-medium text-ink">
          {data.points.length} spectra at E = {field.toFixed(3)} V/nm
        </span>
        {bar ? ` (± ${bar.sigma.toFixed(3)} V/nm from the field model)` : null}: every spectrum sits at the same
        estimated field, so their gaps are counted here rather than drawn against the field.
        {median_meV != null ? ` Median gap ${median_meV.toFixed(1)} meV` : null}
        {spread_meV != null ? `, spread ${spread_meV.toFixed(1)} meV (robust σ)` : null}
        {median_meV != null ? ` over the ${n} in the fit` : null}
        {left ? `; ${left} excluded or left out` : null}.
      </p>
      <div className="h-[360px] w-full">
        <Plot
          data={figure.data}
          layout={figure.layout}
          config={{ displaylogo: false, toImageButtonOptions: { filename } }}
          style={{ width: "100%", height: "100%" }}
          onInitialized={(_f, gd) => (graph.current = gd)}
          onUpdate={(_f, gd) => (graph.current = gd)}
        />
      </div>
      <p className="border-t border-line pt-3 text-xs text-ink-soft">
        {gapMap ? (
          <>
            Where each gap was measured:{" "}
            <a href="#gap-map" className="font-medium text-copper underline-offset-2 hover:underline">
              see the gap map below
            </a>
            .
          </>
        ) : (
          "These spectra carry no positions, so there is no gap map of them."
        )}{" "}
        A spectrum taken at another setpoint or with another tip brings back the plot against the field.
      </p>
    </div>
  );
}
