import { describe, expect, it } from "vitest";
import { csv, csvCell, neutralise } from "@/lib/services/exports/csv";

/**
 * Export cells: RFC 4180 quoting (fields with comma, quote or line break are quoted, quotes
 * doubled), and text cells that spreadsheets evaluate as formulas (leading =, +, -, @, tab, CR)
 * neutralised with a leading apostrophe — the OWASP "CSV injection" guidance (from memory).
 */
describe("CSV export cells", () => {
  it("neutralises text that a spreadsheet would run as a formula", () => {
    for (const t of ["=HYPERLINK(\"x\")", "+1+1", "-2+3", "@SUM(A1)", "\tx", "\rx"]) expect(neutralise(t)).toBe(`'${t}`);
    for (const t of ["terrace B", "W-17", "1e-10"]) expect(neutralise(t)).toBe(t);
  });

  it("never touches numbers, even negative ones", () => {
    expect(csvCell(-0.123)).toBe("-0.123");
    expect(csvCell(1e-10)).toBe("1e-10");
    expect(csvCell(Number.NaN)).toBe("");
  });

  it("quotes per RFC 4180", () => {
    expect(csvCell('a "b", c')).toBe('"a ""b"", c"');
    expect(csvCell("two\nlines")).toBe('"two\nlines"');
    expect(csv(["x", "y"], [[1, "=bad"]])).toBe("x,y\r\n1,'=bad\r\n");
  });
});
