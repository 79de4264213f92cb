import { describe, expect, it } from "vitest";
import { COLORS } from "@/components/plots/plot";
import { ONLY_SERIES, type PhasePoint, regionColors, regionOf, UNTAGGED_SERIES } from "@/components/review/phase-figure";

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
