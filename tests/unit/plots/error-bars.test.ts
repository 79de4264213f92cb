import { describe, expect, it } from "vitest";
import { BAR_ROOM, BAR_Y, fieldModelBar, fieldModelBarShapes } from "@/components/review/field-model-bar";
import { errorBarPaths, fieldModeRanges, gapErrorBarShape, type PhaseData, type PhasePoint } from "@/components/review/phase-figure";

/**
 * The phase plot's error bars under WebGL markers, as SVG path data in data coordinates. The
 * expected strings follow the SVG 1.1 path grammar (W3C, "Paths": M moveto, V vertical lineto,
 * H horizontal lineto, absolute coordinates), worked by hand for each point.
 */
describe("errorBarPaths", () => {
  it("draws a vertical bar of ±σy and a horizontal bar of ±σx through each point", () => {
    const { vertical, horizontal } = errorBarPaths([
      { x: 1, y: 100, sx: 0.05, sy: 8 },
      { x: 1.5, y: 40, sx: 0.02, sy: 2.5 },
    ]);
    expect(vertical).toBe("M1,92V108M1.5,37.5V42.5");
    expect(horizontal).toBe("M0.95,100H1.05M1.48,40H1.52");
  });

  it("draws nothing for a missing, zero or negative σ", () => {
    expect(errorBarPaths([{ x: 1, y: 2, sx: null, sy: 0 }, { x: 3, y: 4, sy: -1 }])).toEqual({ vertical: "", horizontal: "" });
  });

  it("keeps seven significant digits, exponent form for tiny values (log-axis conductances)", () => {
    const { vertical, horizontal } = errorBarPaths([{ x: 2.5e-9, y: 123.456789, sx: 1e-10, sy: 0.1 }]);
    expect(vertical).toBe("M2.5e-9,123.3568V123.5568");
    expect(horizontal).toBe("M2.4e-9,123.4568H2.6e-9");
  });
});

const at = (field: number, sigma: number | null, gap = 100) => ({ field_V_per_nm: field, fieldSigma_V_per_nm: sigma, gap_eV: gap / 1000 }) as unknown as PhasePoint;

/**
 * The field model's σ is shared by every point and moves them together (a scale error): it is
 * drawn once, as one bar of ±σ at the points' median field, sized by the median relative σ (the
 * fit's `systematicFieldRelSigma`), above the data.
 */
describe("fieldModelBar", () => {
  it("is one bar at the median field, ± the median relative σ there", () => {
    // Relative σ 10%, 8%, 12%: median 10%; median field 1.0 V/nm → ±0.1 V/nm.
    const bar = fieldModelBar([at(0.8, 0.08), at(1.0, 0.08), at(1.2, 0.144)])!;
    expect(bar.x).toBe(1);
    expect(bar.rel).toBeCloseTo(0.1, 12);
    expect(bar.sigma).toBeCloseTo(0.1, 12);
  });

  it("is nothing when no point carries a model σ", () => {
    expect(fieldModelBar([at(1, null), at(1.1, 0)])).toBeNull();
    expect(fieldModelBar([])).toBeNull();
  });

  it("is one path shape, one horizontal stroke with end ticks, with a legend entry that says it is shared", () => {
    const { shape, annotation } = fieldModelBarShapes({ x: 1, sigma: 0.1, rel: 0.1 });
    expect(shape).toMatchObject({ type: "path", xref: "x", yref: "paper", showlegend: true });
    expect(shape.path).toBe(`M0.9,${BAR_Y}H1.1M0.9,${BAR_Y - 0.02}V${BAR_Y + 0.02}M1.1,${BAR_Y - 0.02}V${BAR_Y + 0.02}`);
    expect(shape.name).toBe("field model ±10%, shared by all points");
    expect(annotation).toMatchObject({ x: 1, yref: "paper" });
  });

  it("keeps the data below the bar: the gap axis leaves the top strip free", () => {
    const data = { points: [at(0.8, 0.08, 50), at(1.2, 0.12, 150)].map((p) => ({ ...p, gapSigma_eV: 0, excluded: false, excludedByFlag: false })), crossing: { state: "none" } } as unknown as PhaseData;
    const r = fieldModeRanges(data, true)!;
    // Gaps 0…150 meV padded by 5% → 157.5; the data keep below BAR_ROOM of the height.
    expect(r.y[1]).toBeCloseTo(157.5 / BAR_ROOM, 9);
    expect((150 - r.y[0]) / (r.y[1] - r.y[0])).toBeLessThan(BAR_Y - 0.05);
    // The bar (1.0 ± 0.1 V/nm) lies within the field range.
    expect(r.x[0]).toBeLessThan(0.9);
    expect(r.x[1]).toBeGreaterThan(1.1);
  });
});

describe("gapErrorBarShape", () => {
  it("sits below the WebGL canvas in its series' legend group, in the series' colour", () => {
    expect(gapErrorBarShape("M1,92V108", "#1f6b73", "terrace A")).toEqual({ type: "path", path: "M1,92V108", xref: "x", yref: "y", layer: "below", line: { color: "#1f6b73", width: 1 }, legendgroup: "terrace A" });
  });
});
