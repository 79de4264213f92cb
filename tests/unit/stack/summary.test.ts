import { describe, expect, it } from "vitest";
import {
  add,
  formatSteps,
  formatTotals,
  parseVitestJson,
  parseVitestText,
  zero,
} from "@/scripts/stack/summary";

describe("vitest summary parsing", () => {
  it("reads passed, failed and skipped from the text summary", () => {
    const out = [
      " ✓ tests/unit/a.test.ts (3 tests) 4ms",
      "",
      " Test Files  1 failed | 2 passed (3)",
      "      Tests  2 failed | 40 passed | 3 skipped (45)",
      "   Start at  10:00:00",
    ].join("\n");
    expect(parseVitestText(out)).toEqual({ passed: 40, failed: 2, skipped: 3 });
  });

  it("ignores colour codes and counts todo as skipped", () => {
    const out = "\u001b[2m      Tests \u001b[22m \u001b[1m\u001b[32m7 passed\u001b[39m\u001b[22m | 1 todo (8)";
    expect(parseVitestText(out)).toEqual({ passed: 7, failed: 0, skipped: 1 });
  });

  it("returns null when there is no summary (no test files, or a crash)", () => {
    expect(parseVitestText("No test files found, exiting with code 0")).toBeNull();
    expect(parseVitestText("Tests are great")).toBeNull();
  });

  it("reads the JSON reporter's counts", () => {
    expect(
      parseVitestJson({ numPassedTests: 5, numFailedTests: 1, numPendingTests: 2, numTodoTests: 1, success: false }),
    ).toEqual({ passed: 5, failed: 1, skipped: 3 });
    expect(parseVitestJson({ nothing: true })).toBeNull();
    expect(parseVitestJson(null)).toBeNull();
  });

  it("totals several runs into a plain last line", () => {
    const total = [
      { passed: 10, failed: 0, skipped: 1 },
      { passed: 4, failed: 2, skipped: 0 },
    ].reduce(add, zero());
    expect(formatTotals(total)).toBe("14 passed, 2 failed");
    expect(formatTotals(zero())).toBe("0 passed, 0 failed");
  });

  it("names every step and its state", () => {
    expect(
      formatSteps([
        { name: "unit", ok: true, note: "3 passed" },
        { name: "e2e", ok: false, note: "exit 1" },
      ]),
    ).toBe("bandcross test: unit ok (3 passed), e2e FAILED (exit 1)");
  });
});
