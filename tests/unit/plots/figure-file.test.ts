import { describe, expect, it } from "vitest";
import { fileLayout, fileLegend, LEGEND_GAP, legendProbe, MIN_PLOT_SHARE, NARROW_FILE_PX, probeLayout } from "@/components/plots/figure-file";

const phaseLayout = { margin: { l: 64, r: 16, t: 28, b: 52 }, legend: { orientation: "h", y: -0.2, font: { size: 11 } } };

/**
 * A figure file keeps its whole legend: at the figure's foot below the axis, never clipped, with
 * the bottom margin grown by its height, and the file taller when the plot would shrink too far.
 */
describe("fileLayout", () => {
  it("keeps a 1200 × 800 file's size when a 105 px legend leaves the plot most of its room", () => {
    const { layout, height } = fileLayout(phaseLayout, { width: 1200, height: 800, legendHeight: 105 });
    expect(height).toBe(800);
    expect(layout.margin).toEqual({ l: 64, r: 16, t: 28, b: 52 + 105 + LEGEND_GAP });
    // At the bottom of the whole figure, never clipped (maxheight above 1 is px), font kept.
    expect(layout.legend).toMatchObject({ orientation: "h", font: { size: 11 }, yref: "container", y: 0, yanchor: "bottom" });
    expect((layout.legend as unknown as { maxheight: number }).maxheight).toBeGreaterThan(10_000);
  });

  it("makes a phone-sized file taller for a legend of many rows, so the plot keeps its share", () => {
    // 440 px high: the plot's room without a legend is 440 − 28 − 52 = 360 px.
    const { layout, height } = fileLayout(phaseLayout, { width: 380, height: 440, legendHeight: 390 });
    const room = 390 + LEGEND_GAP;
    expect(height).toBe(Math.ceil(28 + 52 + room + MIN_PLOT_SHARE * 360));
    expect(height).toBeGreaterThan(440);
    expect(layout.margin.b).toBe(52 + room);
    // The plot between the margins is the promised share of its former room.
    expect(height - 28 - layout.margin.b).toBeGreaterThanOrEqual(MIN_PLOT_SHARE * 360);
  });

  it("lays out afresh the room a narrow screen gave its legend, instead of adding to it", () => {
    const screen = { ...phaseLayout, margin: { ...phaseLayout.margin, b: 52 + 212 }, meta: { legendRoom: 212 } };
    const { layout } = fileLayout(screen, { width: 380, height: 652, legendHeight: 200 });
    expect(layout.margin.b).toBe(52 + 200 + LEGEND_GAP);
  });

  it("leaves a figure without a legend as it is", () => {
    const noLegend = { ...phaseLayout, showlegend: false };
    expect(fileLayout(noLegend, { width: 500, height: 380, legendHeight: 120 })).toEqual({ layout: noLegend, height: 380 });
    expect(fileLayout(phaseLayout, { width: 500, height: 380, legendHeight: 0 })).toEqual({ layout: phaseLayout, height: 380 });
  });
});

describe("fileLegend / probeLayout", () => {
  it("lays a wide file's legend out as on screen, at the foot, never clipped", () => {
    const legend = fileLegend(phaseLayout, 1200);
    expect(legend).toMatchObject({ orientation: "h", font: { size: 11 }, yref: "container", y: 0, yanchor: "bottom" });
    expect((legend as { maxheight: number }).maxheight).toBeGreaterThan(10_000);
  });

  it("lists a narrow file's legend one entry a row from near the figure's left edge", () => {
    const width = NARROW_FILE_PX - 260;
    const legend = fileLegend(phaseLayout, width) as { orientation: string; xref: string; x: number; xanchor: string };
    expect(legend).toMatchObject({ orientation: "v", xref: "paper", xanchor: "left", yref: "container", y: 0 });
    // x in plot widths from the plot's left edge: 8 px from the figure's left edge.
    const plot = width - 64 - 16;
    expect(64 + legend.x * plot).toBeCloseTo(8, 6);
  });

  it("measures the legend as the file lays it out", () => {
    expect(probeLayout(phaseLayout, 380).legend).toEqual(fileLegend(phaseLayout, 380));
    expect(probeLayout(phaseLayout, 1200).legend).toEqual(fileLegend(phaseLayout, 1200));
    expect(fileLayout(phaseLayout, { width: 380, height: 440, legendHeight: 200 }).layout.legend).toEqual(fileLegend(phaseLayout, 380));
  });
});

describe("legendProbe", () => {
  it("keeps each trace's name and look with its first point, WebGL traces as SVG", () => {
    const xs = Array.from({ length: 5000 }, (_, i) => i);
    const probe = legendProbe([
      { type: "scattergl", name: "terrace A", x: xs, y: xs, customdata: xs.map(String), marker: { color: "#1f6b73", symbol: "circle" }, legendgroup: "terrace A" },
      { type: "scatter", name: "95% band", x: [1, 2], y: [3, 4], fill: "tonexty" },
    ]);
    expect(probe).toEqual([
      { type: "scatter", name: "terrace A", x: [0], y: [0], customdata: ["0"], marker: { color: "#1f6b73", symbol: "circle" }, legendgroup: "terrace A" },
      { type: "scatter", name: "95% band", x: [1], y: [3], fill: "tonexty" },
    ]);
  });
});
