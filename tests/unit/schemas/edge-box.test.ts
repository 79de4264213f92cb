import { describe, expect, it } from "vitest";
import { edgeProblem } from "@/components/review/edge-box";

/** Typed band edges (mV) on a spectrum measured from −0.5 to 0.5 V (cases from the review page's bugs). */
const range: [number, number] = [-0.5, 0.5];

describe("edgeProblem", () => {
  it("reads numbers as every input does, a decimal comma too", () => {
    expect(edgeProblem("-60,5", { range })).toEqual({ value: -0.0605 });
    expect(edgeProblem(" 6 ", { range })).toEqual({ value: 0.006 });
  });
  it("refuses blank, text, a lone point and infinity in words instead of reading 0 or NaN", () => {
    expect(edgeProblem("", { range })).toEqual({ problem: "Type the edge in mV." });
    for (const t of [".", "abc", "-", "Infinity"]) expect(edgeProblem(t, { range })).toEqual({ problem: `"${t}" is not a number (mV).` });
  });
  it("refuses an edge outside the bias range or on the wrong side of the other edge", () => {
    expect(edgeProblem("9999", { range })).toEqual({ problem: "9999 mV is outside this spectrum's bias range (-500 to 500 mV)." });
    expect("problem" in edgeProblem("20", { range, below: 0.01 })).toBe(true);
    expect("problem" in edgeProblem("-20", { range, above: -0.01 })).toBe(true);
  });
});
