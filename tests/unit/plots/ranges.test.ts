import { describe, expect, it } from "vitest";
import { niceTicks, paddedRange } from "@/components/plots/ranges";

/**
 * Axis ranges and ticks shared by the phase plot's still preview and the interactive plot. Tick
 * steps of 1, 2 or 5 × 10^k are common practice for linear axes; the expected values are worked by
 * hand from that rule.
 */
describe("paddedRange", () => {
  it("pads 5% of the span on each side", () => {
    expect(paddedRange([1, 3])).toEqual([0.9, 3.1]);
  });

  it("reaches zero when asked, without padding below a zero floor", () => {
    const r = paddedRange([100, 200], { includeZero: true })!;
    expect(r[0]).toBe(0);
    expect(r[1]).toBeCloseTo(210, 12);
    const neg = paddedRange([-10, 90], { includeZero: true })!;
    expect(neg[0]).toBeCloseTo(-15, 12);
    expect(neg[1]).toBeCloseTo(95, 12);
  });

  it("skips non-finite values and answers null when nothing is left", () => {
    expect(paddedRange([Number.NaN, 2, Infinity, 4])).toEqual([1.9, 4.1]);
    expect(paddedRange([Number.NaN])).toBeNull();
    expect(paddedRange([])).toBeNull();
  });

  it("gives a single value a width of its own", () => {
    expect(paddedRange([2])).toEqual([1.9, 2.1]);
    expect(paddedRange([0])).toEqual([-0.5, 0.5]);
  });
});

describe("niceTicks", () => {
  it("steps by 1, 2 or 5 × 10^k inside the range", () => {
    expect(niceTicks(0.62, 1.39, 8)).toEqual([0.7, 0.8, 0.9, 1, 1.1, 1.2, 1.3]);
    expect(niceTicks(-19.9, 185, 5)).toEqual([0, 50, 100, 150]);
    expect(niceTicks(0, 1, 5)).toEqual([0, 0.2, 0.4, 0.6, 0.8, 1]);
    expect(niceTicks(0, 10, 2)).toEqual([0, 5, 10]);
  });

  it("prints clean decimals (no 0.30000000000000004)", () => {
    for (const t of niceTicks(0.1, 0.45, 7)) expect(String(t).length).toBeLessThanOrEqual(4);
  });

  it("answers nothing for an empty or inverted range", () => {
    expect(niceTicks(1, 1)).toEqual([]);
    expect(niceTicks(2, 1)).toEqual([]);
    expect(niceTicks(Number.NaN, 1)).toEqual([]);
  });
});
