"use client";

import dynamic from "next/dynamic";
import type { PlotParams } from "react-plotly.js/factory";

/**
 * Plotly, loaded in the browser only and only on pages that plot (the bundle is large). Built with
 * the factory from the minified distribution so the full source build is never installed.
 */
// Start fetching the (large) Plotly bundle as soon as a page that plots is loaded, in parallel with
// its data, rather than when the plot first renders.
const plotlyModules = typeof window === "undefined" ? null : Promise.all([import("react-plotly.js/factory"), import("plotly.js-dist-min")]);

export const Plot = dynamic<PlotParams>(
  async () => {
    const [{ default: createPlotlyComponent }, Plotly] = await (plotlyModules ?? Promise.all([import("react-plotly.js/factory"), import("plotly.js-dist-min")]));
    return createPlotlyComponent((Plotly as { default?: unknown }).default ?? Plotly) as React.ComponentType<PlotParams>;
  },
  { ssr: false, loading: () => <div className="h-full min-h-64 w-full animate-pulse rounded-lg bg-line/50" aria-label="Loading the plot" /> },
);

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
