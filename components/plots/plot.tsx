"use client";

import dynamic from "next/dynamic";
import { preinit } from "react-dom";
import type { PlotParams } from "react-plotly.js/factory";
import { loadPlotly, PLOTLY_SRC } from "./plotly-script";

/**
 * Plotly in the browser only, built with react-plotly's factory around the global from the
 * versioned static script (`plotly-script.ts`), so the bundler never carries the library.
 */
const LazyPlot = dynamic<PlotParams>(
  async () => {
    const [{ default: createPlotlyComponent }, Plotly] = await Promise.all([import("react-plotly.js/factory"), loadPlotly()]);
    return createPlotlyComponent(Plotly) as React.ComponentType<PlotParams>;
  },
  { ssr: false, loading: () => <div className="h-full min-h-64 w-full animate-pulse rounded-lg bg-line/50" aria-label="Loading the plot" /> },
);

/**
 * WebGL traces draw into canvases of (plot size × this ratio); Plotly's default of 2 quadruples the
 * pixels on an ordinary screen, and creating and clearing those buffers was half of a 5,000-point
 * phase plot's first draw in chromium without a GPU. The screen's own ratio, between 1 and 2.
 */
export function glPixelRatio(): number {
  return typeof window === "undefined" ? 1 : Math.min(2, Math.max(1, window.devicePixelRatio || 1));
}

/** A Plotly figure; rendering it (on the server too) names the library's script in the page head. */
export function Plot(props: PlotParams) {
  preinit(PLOTLY_SRC, { as: "script", fetchPriority: "high" });
  return <LazyPlot {...props} config={{ plotGlPixelRatio: glPixelRatio(), ...(props.config as Record<string, unknown> | undefined) }} />;
}

/** The product's plot look: our fonts, paper background, quiet grid. */
export const PLOT_FONT = { family: "var(--font-plex-sans), ui-sans-serif, system-ui, sans-serif", size: 12, color: "#1c2430" };
export const COLORS = ["#1f6b73", "#b9512a", "#5b4b8a", "#7a8b2e", "#a13d63", "#2f5f9e"];

export function baseLayout(extra: Record<string, unknown> = {}) {
  return {
    font: PLOT_FONT,
    paper_bgcolor: "rgba(0,0,0,0)",
    plot_bgcolor: "#fffdf8",
    margin: { l: 64, r: 16, t: 16, b: 52 },
    hoverlabel: { font: { family: PLOT_FONT.family } },
    legend: { orientation: "h", y: -0.2, font: { size: 11 } },
    ...extra,
  };
}

export const axis = (title: string, extra: Record<string, unknown> = {}) => ({
  title: { text: title, standoff: 8 },
  gridcolor: "#ece6d8",
  zerolinecolor: "#d8cfbd",
  linecolor: "#cfc6b4",
  ticks: "outside",
  tickcolor: "#cfc6b4",
  ...extra,
});
