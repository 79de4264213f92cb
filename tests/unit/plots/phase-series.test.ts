import { describe, expect, it } from "vitest";
import { COLORS } from "@/components/plots/plot";
import {
  LEGEND_GAP_PX,
  LEGEND_ROW_PX,
  legendEntries,
  NARROW_LEGEND,
  NARROW_MAX_PX,
  NARROW_QUERY,
  narrowLegendRoom,
  ONLY_SERIES,
  PHASE_MARGIN,
  PHASE_TOP_NARROW,
  phaseMargin,
  type PhasePoint,
  regionColors,
  regionOf,
  UNTAGGED_SERIES,
} from "@/components/review/phase-figure";

const point = (i: number, region: string | null) => ({ spectrumId: `s${i}`, region }) as unknown as PhasePoint;

/** The phase plot's series (legend entries and the key of the still preview), one per region. */
describe("regionColors", () => {
  it("names points without a region 'no region tagged', after the sample's regions in name order", () => {
    const series = regionColors([point(0, null), point(1, "terrace B"), point(2, "step edge"), point(3, null), point(4, "terrace B")]);
    expect(series.map((s) => [s.region, s.name])).toEqual([
      ["step edge", "step edge"],
      ["terrace B", "terrace B"],
      [null, UNTAGGED_SERIES],
    ]);
    expect(UNTAGGED_SERIES).toBe("no region tagged");
    expect(series.map((s) => s.color)).toEqual(COLORS.slice(0, 3));
  });

  it("never calls untagged points 'all regions'", () => {
    const names = [...regionColors([point(0, null), point(1, "terrace A")]), ...regionColors([point(0, null)])].map((s) => s.name);
    expect(names.join("|")).not.toMatch(/all regions/);
  });

  it("is one plainly named series when no point of the sample has a region", () => {
    expect(regionColors([point(0, null), point(1, null), point(2, "")])).toEqual([{ region: null, name: ONLY_SERIES, color: COLORS[0] }]);
    expect(ONLY_SERIES).toBe("spectra");
  });

  it("has no untagged series when every point has a region", () => {
    expect(regionColors([point(0, "terrace A"), point(1, "terrace A")]).map((s) => s.name)).toEqual(["terrace A"]);
  });

  it("puts each point in exactly one series (regionOf matches the series' region)", () => {
    const points = [point(0, null), point(1, "terrace A"), point(2, ""), point(3, "step edge")];
    const series = regionColors(points);
    for (const p of points) expect(series.filter((s) => s.region === regionOf(p))).toHaveLength(1);
  });
});

/** On a narrow screen the mode bar spans the figure's top; the E_c label then sits below it. */
describe("phaseMargin", () => {
  it("keeps the usual margins on a wide screen, and on a narrow one without the E_c label", () => {
    expect(phaseMargin(false, true)).toEqual(PHASE_MARGIN);
    expect(phaseMargin(true, false)).toEqual(PHASE_MARGIN);
  });

  it("gives the E_c label room below the mode bar (about 28 px) on a narrow screen", () => {
    const m = phaseMargin(true, true);
    expect(m).toEqual({ ...PHASE_MARGIN, t: PHASE_TOP_NARROW });
    // The label (12 px text, about 18 px tall) sits just above the plot area, under the bar.
    expect(m.t - 18).toBeGreaterThanOrEqual(28);
  });

  it("on a narrow screen holds the legend below the axis title: the bottom margin grows by its room", () => {
    expect(phaseMargin(true, false, 212).b).toBe(PHASE_MARGIN.b + 212);
    expect(phaseMargin(false, false, 212)).toEqual(PHASE_MARGIN);
  });

  it("counts a 412 px phone as narrow", () => {
    expect(NARROW_QUERY).toBe(`(max-width: ${NARROW_MAX_PX}px)`);
    expect(412).toBeLessThanOrEqual(NARROW_MAX_PX);
  });
});

/** A narrow screen's legend: one entry a row at the figure's foot, the room it needs counted from the figure. */
describe("narrow legend", () => {
  it("counts the traces Plotly lists and the shapes given an entry", () => {
    const traces = [{ name: "a" }, { name: "b", showlegend: false }, { name: "c", showlegend: true }];
    const shapes = [{ showlegend: true }, { legendgroup: "a" }];
    expect(legendEntries(traces, shapes)).toBe(3);
  });

  it("takes a row per entry and a gap above, nothing without entries", () => {
    expect(narrowLegendRoom(10)).toBe(10 * LEGEND_ROW_PX + LEGEND_GAP_PX);
    expect(narrowLegendRoom(0)).toBe(0);
  });

  it("sits at the figure's foot, one entry a row", () => {
    expect(NARROW_LEGEND).toMatchObject({ orientation: "v", yref: "container", y: 0, yanchor: "bottom" });
  });
});
