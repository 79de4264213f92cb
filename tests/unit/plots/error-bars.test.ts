import { describe, expect, it } from "vitest";
import { errorBarPaths, fieldErrorBarShape, gapErrorBarShape, WEBGL_FROM } from "@/components/review/phase-figure";

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

/**
 * The field bars' σ comes from the field model and moves every point together; they are one
 * legend entry that says so, shown for SVG-sized samples and hidden (legend only) from the WebGL
 * size up, where thousands of overlapping bars would cover the data.
 */
describe("fieldErrorBarShape", () => {
  it("is one path with a legend entry naming the shared model σ", () => {
    const shape = fieldErrorBarShape("M0.95,100H1.05", 10);
    expect(shape).toMatchObject({ type: "path", path: "M0.95,100H1.05", xref: "x", yref: "y", showlegend: true, visible: true });
    expect(shape.name).toMatch(/model.*shared by all points/);
  });

  it("starts hidden, one legend click away, from the WebGL size up", () => {
    expect(fieldErrorBarShape("M0,1H2", WEBGL_FROM - 1).visible).toBe(true);
    expect(fieldErrorBarShape("M0,1H2", WEBGL_FROM).visible).toBe("legendonly");
    expect(fieldErrorBarShape("M0,1H2", 5000).visible).toBe("legendonly");
  });
});

describe("gapErrorBarShape", () => {
  it("sits below the WebGL canvas in its series' legend group, in the series' colour", () => {
    expect(gapErrorBarShape("M1,92V108", "#1f6b73", "terrace A")).toEqual({ type: "path", path: "M1,92V108", xref: "x", yref: "y", layer: "below", line: { color: "#1f6b73", width: 1 }, legendgroup: "terrace A" });
  });
});
