/**
 * The plots' font family, as names: a CSS variable in Plotly's text makes the whole declaration
 * void wherever the page's styles are absent (figure files, where text fell back to a serif). On
 * screen the page's own face (the family name next/font gave it, read once), then the face by its
 * usual name for files opened where it is installed, then common sans-serifs.
 */
export const FILE_FONTS = '"IBM Plex Sans", "Helvetica Neue", Arial, sans-serif';
let fontFamily: string | null = null;
function plotFontFamily(): string {
  if (typeof document === "undefined") return FILE_FONTS;
  fontFamily ??= [getComputedStyle(document.documentElement).getPropertyValue("--font-plex-sans").trim(), FILE_FONTS]
    .filter(Boolean)
    .join(", ");
  return fontFamily;
}

/** The product's plot look: our fonts, paper background, quiet grid. */
export const PLOT_FONT = { size: 12, color: "#1c2430" };
export const COLORS = ["#1f6b73", "#b9512a", "#5b4b8a", "#7a8b2e", "#a13d63", "#2f5f9e"];
/** Plot area, grid and axis-line colours. */
export const PLOT_STYLE = { plotBg: "#fffdf8", grid: "#ece6d8", zeroline: "#d8cfbd", axisLine: "#cfc6b4" } as const;

export function baseLayout(extra: Record<string, unknown> = {}) {
  return {
    font: { ...PLOT_FONT, family: plotFontFamily() },
    paper_bgcolor: "rgba(0,0,0,0)",
    plot_bgcolor: PLOT_STYLE.plotBg,
    margin: { l: 64, r: 16, t: 16, b: 52 },
    hoverlabel: { font: { family: plotFontFamily() } },
    legend: { orientation: "h", y: -0.2, font: { size: 11 } },
    ...extra,
  };
}

export const axis = (title: string, extra: Record<string, unknown> = {}) => ({
  title: { text: title, standoff: 8 },
  gridcolor: PLOT_STYLE.grid,
  zerolinecolor: PLOT_STYLE.zeroline,
  linecolor: PLOT_STYLE.axisLine,
  ticks: "outside",
  tickcolor: PLOT_STYLE.axisLine,
  ...extra,
});
