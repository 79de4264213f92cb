import { axis, baseLayout } from "@/components/plots/plot";
import type { getGapMap } from "@/lib/services/spectra/getGapMap";

export type MapData = Awaited<ReturnType<typeof getGapMap>>;
type Cell = MapData["cells"][number];

/** Plot margins, the plot area's height in a 380 px box, and the room the colour bar takes. */
const MAP_MARGIN = { l: 56, r: 16, t: 12, b: 48 };
const MAP_AREA_PX = 380 - MAP_MARGIN.t - MAP_MARGIN.b;
const COLOR_BAR_PX = 110;

/** What a cell's hover says of its gap: the gap in meV, or why there is none. */
export function cellGapText(c: Cell): string {
  if (c.gap_eV != null) return `gap ${(c.gap_eV * 1000).toFixed(1)} meV`;
  if (c.excluded) return "excluded (no gap shown)";
  if (c.metallic) return "no gap (metallic)";
  return "no gap picked";
}

/**
 * Each cell's data for hover and click: [spectrum id, file name (and label), gap text]. The hover
 * reads the last two (`%{customdata[1]}`, `%{customdata[2]}`), a click the first.
 */
const cellData = (c: Cell): [string, string, string] => [
  c.id,
  c.label && c.label !== c.fileName ? `${c.fileName} · ${c.label}` : c.fileName,
  cellGapText(c),
];

/** The hover of every cell: its gap, its position in nm, and the file it came from. */
export const GAP_MAP_HOVER = "%{customdata[2]}<br>x %{x:.2f} nm, y %{y:.2f} nm<br>%{customdata[1]}<extra></extra>";

/**
 * The gap map's figure: a heatmap for a regular grid, square markers otherwise, with cells
 * without a gap left empty, and its width (the map at its true aspect beside its colour bar).
 */
export function gapMapFigure(data: MapData) {
  const xs = [...new Set(data.cells.map((c) => c.x_nm))].sort((a, b) => a - b);
  const ys = [...new Set(data.cells.map((c) => c.y_nm))].sort((a, b) => a - b);
  const xi = new Map(xs.map((v, i) => [v, i]));
  const yi = new Map(ys.map((v, i) => [v, i]));
  const z: (number | null)[][] = ys.map(() => xs.map(() => null));
  const custom: ([string, string, string] | null)[][] = ys.map(() => xs.map(() => null));
  for (const c of data.cells) {
    z[yi.get(c.y_nm)!][xi.get(c.x_nm)!] = c.gap_eV == null ? null : c.gap_eV * 1000;
    custom[yi.get(c.y_nm)!][xi.get(c.x_nm)!] = cellData(c);
  }
  const regular = xs.length * ys.length <= data.cells.length * 1.05;
  const trace = regular
    ? {
        type: "heatmap",
        x: xs,
        y: ys,
        z,
        customdata: custom,
        colorscale: [
          [0, "#16323a"],
          [0.5, "#1f6b73"],
          [0.8, "#e0b589"],
          [1, "#b9512a"],
        ],
        colorbar: { title: { text: "gap (meV)" } },
        hovertemplate: GAP_MAP_HOVER,
        hoverongaps: false,
      }
    : {
        type: "scatter",
        mode: "markers",
        x: data.cells.map((c) => c.x_nm),
        y: data.cells.map((c) => c.y_nm),
        customdata: data.cells.map(cellData),
        marker: {
          symbol: "square",
          size: 9,
          color: data.cells.map((c) => (c.gap_eV == null ? null : c.gap_eV * 1000)),
          colorscale: "Cividis",
          showscale: true,
          colorbar: { title: { text: "gap (meV)" } },
        },
        hovertemplate: GAP_MAP_HOVER,
      };
  // Wide enough for the map at its true aspect (equal nm per pixel both ways) and its colour
  // bar beside it, no wider: in a full-width box the bar stood far from a square map.
  const span = (v: number[]) => (v.length > 1 ? ((v[v.length - 1] - v[0]) * v.length) / (v.length - 1) : 1);
  const aspect = span(xs) / span(ys) || 1;
  const width = Math.round(MAP_AREA_PX * aspect) + MAP_MARGIN.l + MAP_MARGIN.r + COLOR_BAR_PX;
  return {
    width,
    data: [trace],
    layout: baseLayout({
      xaxis: axis("x (nm)", { constrain: "domain" }),
      yaxis: axis("y (nm)", { scaleanchor: "x" }),
      margin: MAP_MARGIN,
    }),
  };
}

/** The spectrum id of a clicked cell (null for an empty one). */
export const clickedCell = (customdata: unknown): string | null =>
  Array.isArray(customdata) && typeof customdata[0] === "string" ? customdata[0] : null;
