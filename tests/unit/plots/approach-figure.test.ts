import { describe, expect, it } from "vitest";
import { approachFigure, type CurveData } from "@/components/barrier/approach-figure";

/** Ten points of I = 100 pA·exp(−20z) at z = 0 … 0.45 nm; the last three in the floor, the first one at contact. */
const z = Array.from({ length: 10 }, (_, i) => 0.05 * i);
const curve: CurveData = {
  id: "c",
  label: "current",
  file: "iz.csv",
  status: "ok",
  z_nm: z,
  current_A: z.map((v) => 1e-10 * Math.exp(-20 * v)),
  pointStatus: [3, 0, 0, 0, 0, 0, 0, 1, 1, 1],
  sweeps: [{ direction: "retraction", from: 0, to: 10, lnI0: Math.log(1e-10), slope_per_nm: -20, offset_A: 0, sign: 1, range_nm: [0.05, 0.3] }],
};

describe("the I(z) figure", () => {
  const f = approachFigure(curve);
  const byName = (n: string) => f.data.find((t) => String(t.name).startsWith(n))!;
  it("draws the used points, the fit named with κ = −slope/2, residuals of zero for an exact exponential", () => {
    expect((byName("retraction: used").x as number[]).length).toBe(6);
    const fit = byName("retraction: fit");
    expect(fit.name).toBe("retraction: fit, κ = 10.00 nm⁻¹");
    // At z = 0 the line is I₀ = 100 pA; at z = 0.45 nm, 100·e^−9 pA.
    expect((fit.y as number[])[0]).toBeCloseTo(100, 9);
    expect((fit.y as number[])[1]).toBeCloseTo(100 * Math.exp(-9), 9);
    const res = f.data.find((t) => t.yaxis === "y2")!;
    for (const r of res.y as number[]) expect(Math.abs(r)).toBeLessThan(1e-9);
  });
  it("shows the points left out by reason, with counts, and shades z outside the fitted range", () => {
    expect(f.data.map((t) => t.name)).toEqual(expect.arrayContaining(["left out: noise floor (3)", "left out: point contact (1)"]));
    const shapes = (f.layout as { shapes?: unknown }).shapes as { x0: number; x1: number }[];
    expect(shapes.map((s) => [s.x0, s.x1])).toEqual([
      [0, 0.05],
      [0.3, 0.45],
    ]);
  });
});
