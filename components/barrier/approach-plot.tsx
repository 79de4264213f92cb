"use client";

import { useMemo } from "react";
import { Plot } from "@/components/plots/plot";
import { approachFigure, type CurveData } from "./approach-figure";

/** One I(z) curve: |I| against z with the fit and the points left out, residuals below. */
export function ApproachPlot({ curve, filename }: { curve: CurveData; filename: string }) {
  const figure = useMemo(() => approachFigure(curve), [curve]);
  return (
    <div className="h-[380px] w-full" data-testid="approach-plot">
      <Plot
        data={figure.data as never}
        layout={figure.layout as never}
        config={{ displaylogo: false, toImageButtonOptions: { filename } }}
        style={{ width: "100%", height: "100%" }}
      />
    </div>
  );
}
