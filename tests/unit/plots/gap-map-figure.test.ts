import { describe, expect, it } from "vitest";
import { cellGapText, clickedCell, GAP_MAP_HOVER, gapMapFigure, type MapData } from "@/components/review/gap-map-figure";

type Cell = MapData["cells"][number];
const cell = (i: number, x: number, y: number, over: Partial<Cell> = {}): Cell => ({ id: `id-${i}`, x_nm: x, y_nm: y, gap_eV: 0.08 + 0.001 * i, closed: false, metallic: false, excluded: false, fileName: "grid-2x2.csv", label: `px${i}`, ...over });
const map = (cells: Cell[]): MapData => ({ grids: [{ id: "u1", fileName: "grid-2x2.csv", n: cells.length }], uploadId: "u1", cells });

/** The gap map's hover names each cell's gap, position and file; a click reads the spectrum id. */
describe("gapMapFigure", () => {
  it("gives every cell of a regular grid its id, file and gap text, in the heatmap's row/column order", () => {
    const cells = [cell(0, 0, 0), cell(1, 0.5, 0), cell(2, 0, 0.5, { gap_eV: null, metallic: true }), cell(3, 0.5, 0.5, { fileName: "scan.zip/row2.csv", label: "scan.zip/row2.csv" })];
    const trace = gapMapFigure(map(cells)).data[0] as { type: string; customdata: unknown[][]; hovertemplate: string; z: unknown[][] };
    expect(trace.type).toBe("heatmap");
    // Rows are y (upwards), columns x.
    expect(trace.customdata).toEqual([
      [["id-0", "grid-2x2.csv · px0", "gap 80.0 meV"], ["id-1", "grid-2x2.csv · px1", "gap 81.0 meV"]],
      [["id-2", "grid-2x2.csv · px2", "no gap (metallic)"], ["id-3", "scan.zip/row2.csv", "gap 83.0 meV"]],
    ]);
    expect(trace.z[1][0]).toBeNull();
    expect(trace.hovertemplate).toBe(GAP_MAP_HOVER);
  });

  it("hovers with the gap, x and y in nm, and the file name", () => {
    expect(GAP_MAP_HOVER).toContain("%{customdata[2]}");
    expect(GAP_MAP_HOVER).toContain("x %{x:.2f} nm, y %{y:.2f} nm");
    expect(GAP_MAP_HOVER).toContain("%{customdata[1]}");
  });

  it("gives scattered positions (no regular grid) the same hover and cell data", () => {
    const cells = [cell(0, 0, 0), cell(1, 0.31, 0.07), cell(2, 0.9, 0.4)];
    const trace = gapMapFigure(map(cells)).data[0] as { type: string; customdata: unknown[]; hovertemplate: string };
    expect(trace.type).toBe("scatter");
    expect(trace.hovertemplate).toBe(GAP_MAP_HOVER);
    expect(trace.customdata[1]).toEqual(["id-1", "grid-2x2.csv · px1", "gap 81.0 meV"]);
  });
});

describe("cellGapText", () => {
  it("says the gap in meV, or why a cell has none", () => {
    expect(cellGapText(cell(0, 0, 0, { gap_eV: 0.1234 }))).toBe("gap 123.4 meV");
    expect(cellGapText(cell(0, 0, 0, { gap_eV: null, excluded: true }))).toBe("excluded (no gap shown)");
    expect(cellGapText(cell(0, 0, 0, { gap_eV: null, metallic: true }))).toBe("no gap (metallic)");
    expect(cellGapText(cell(0, 0, 0, { gap_eV: null }))).toBe("no gap picked");
  });
});

describe("clickedCell", () => {
  it("reads the spectrum id of a clicked cell, nothing for an empty one", () => {
    expect(clickedCell(["id-7", "f.csv", "gap 80.0 meV"])).toBe("id-7");
    expect(clickedCell(null)).toBeNull();
    expect(clickedCell(undefined)).toBeNull();
  });
});
