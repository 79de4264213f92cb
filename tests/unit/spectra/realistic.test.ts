/**
 * The picker on spectra with the imperfections of real measurements (lib/spectra/suite.ts), category
 * by category, on the tests' own seed (the benchmark uses another). Each category's spectra carry
 * their true band edges from the physical model in lib/spectra/synthetic.ts.
 *
 * The rule every check comes back to (the product's promise): a number we show is right within twice
 * its stated uncertainty, or carries a quality flag saying why it may not be.
 */
import { describe, expect, it } from "vitest";
import { compareRepeats, makeNoise, makeRepeats, makeSpectrum, pickGap, quantile, repeatGroups, type GapPick } from "@/lib/spectra";
import { autocorrelationTime } from "@/lib/spectra/edges/baseline";
import { makeSuite, type SuiteCategory, type SuiteEntry } from "@/lib/spectra/suite";

const SEED = 1_501;
const picked = new Map<SuiteCategory, { e: SuiteEntry; p: GapPick }[]>();
function category(c: SuiteCategory, n = 8) {
  if (!picked.has(c)) picked.set(c, makeSuite({ seed: SEED, categories: [c], perCategory: n }).map((e) => ({ e, p: pickGap(e.spectrum) })));
  return picked.get(c)!;
}
const errMeV = ({ e, p }: { e: SuiteEntry; p: GapPick }) => Math.abs(p.gap_eV! - e.spectrum.truth.gap_eV) * 1000;
/** Right within 2u, or flagged. */
const honest = (x: { e: SuiteEntry; p: GapPick }) => x.p.status === "ok" && (errMeV(x) <= 2000 * x.p.uncertainty_eV! || x.p.flags.length > 0);

describe("noise statistics", () => {
  it("AR(1) noise has the requested σ and lag-1 correlation, and τ ≈ (1 + ρ)/(1 − ρ) (von Storch & Zwiers 1999, from memory)", () => {
    const x = makeNoise(20_000, 0.5, "ar1", 3, 0.7);
    const sd = Math.sqrt(x.reduce((a, v) => a + v * v, 0) / x.length);
    // Standard error of σ from 20,000 correlated points is about 1%; allow 5%.
    expect(Math.abs(sd / 0.5 - 1)).toBeLessThan(0.05);
    const { tau, rho1 } = autocorrelationTime(x);
    expect(Math.abs(rho1 - 0.7)).toBeLessThan(0.03);
    // (1 + 0.7)/(1 − 0.7) = 5.67; the windowed sum is a little low (it stops where ρₖ turns negative).
    expect(tau).toBeGreaterThan(4.5);
    expect(tau).toBeLessThan(6.5);
  });
  it("σ from first differences underestimates AR(1) noise by √(1 − ρ) (exact for AR(1)), which is why the picker measures σ about a baseline", () => {
    const x = makeNoise(20_000, 1, "ar1", 4, 0.8);
    const d = Float64Array.from({ length: x.length - 1 }, (_, i) => x[i + 1] - x[i]);
    const sdDiff = Math.sqrt(d.reduce((a, v) => a + v * v, 0) / d.length) / Math.SQRT2;
    expect(Math.abs(sdDiff - Math.sqrt(1 - 0.8))).toBeLessThan(0.03);
  });
  it("1/f noise has a spectral slope near −1 (spectral synthesis)", () => {
    // Averaged periodogram of 40 realisations, slope of log power against log frequency over two decades.
    const n = 1024;
    const power = new Float64Array(n / 2);
    for (let r = 0; r < 40; r++) {
      const x = makeNoise(n, 1, "pink", 100 + r);
      for (let k = 1; k < n / 2; k++) {
        let re = 0, im = 0;
        for (let i = 0; i < n; i++) {
          re += x[i] * Math.cos((2 * Math.PI * k * i) / n);
          im -= x[i] * Math.sin((2 * Math.PI * k * i) / n);
        }
        power[k] += re * re + im * im;
      }
    }
    let sx = 0, sy = 0, sxx = 0, sxy = 0, m = 0;
    for (let k = 2; k <= 200; k++) {
      const lx = Math.log(k), ly = Math.log(power[k]);
      sx += lx; sy += ly; sxx += lx * lx; sxy += lx * ly; m++;
    }
    const slope = (m * sxy - sx * sy) / (m * sxx - sx * sx);
    expect(slope).toBeGreaterThan(-1.2);
    expect(slope).toBeLessThan(-0.8);
  });
});

describe("categories of real-world imperfections", () => {
  // Tolerance: 2 × the stated uncertainty (the product's promise); the 90% share leaves room for the
  // one miss in ten that a 2σ-type interval allows, on 8 spectra per category at most one.
  for (const c of ["model", "edge-states", "v-in-gap", "sloped", "curved", "ar1", "pink", "drift", "tip-step"] as SuiteCategory[]) {
    it(`${c}: every gap within 2u or flagged, and the median error ≤ 3 meV`, () => {
      const xs = category(c);
      expect(xs.every((x) => x.p.status === "ok")).toBe(true);
      expect(xs.filter(honest).length).toBeGreaterThanOrEqual(xs.length - 1);
      expect(quantile(xs.map(errMeV), 0.5)).toBeLessThanOrEqual(3);
    });
  }
  it("sloped and curved backgrounds: no edge deep inside the gap (was: errors of 100–400 meV with a stated uncertainty of a few meV)", () => {
    for (const x of [...category("sloped"), ...category("curved")]) expect(errMeV(x) <= 50 || x.p.flags.length > 0).toBe(true);
  });
  it("weak onsets: the weak edge is right within 2u or flagged as noisy or unreliable (at least 11 of 12)", () => {
    // One in ten may miss 2u, as for any 2σ-type interval; on this seed one does (a 63 meV gap with a
    // weak conduction onset read as 16 ± 8 meV by the joint fit of close edges), which the benchmark
    // counts among its "≤2u" misses.
    const xs = category("weak-onset", 12);
    expect(xs.filter(honest).length).toBeGreaterThanOrEqual(11);
  });
  it("glitches are removed and flagged with their places; the gap stays within 2u", () => {
    for (const x of category("glitches")) {
      expect(x.p.flags.some((f) => f.code === "glitch" && f.at_V!.length > 0)).toBe(true);
      expect(honest(x)).toBe(true);
    }
  });
  it("clipped tops are flagged, with the clipped range", () => {
    for (const x of category("clipped")) {
      const f = x.p.flags.find((g) => g.code === "clipped");
      expect(f).toBeDefined();
      expect(f!.at_V![1]).toBeGreaterThanOrEqual(f!.at_V![0]);
    }
    // And a clean spectrum is not (a real signal never repeats its maximum to the last digit).
    expect(pickGap(makeSpectrum({ vbEdge_V: -0.1, cbEdge_V: 0.2, seed: 3 })).flags.some((f) => f.code === "clipped")).toBe(false);
  });
  it("lock-in of 5–10 mV rms on 50–100 meV gaps, and 77 K: within 2u", () => {
    for (const x of category("broad")) expect(honest(x)).toBe(true);
  });
  it("metals give no gap", () => {
    for (const x of category("metal")) expect(x.p.status).toBe("no-gap");
  });
  it("nearly closed V-shaped spectra (true gap 0–8 meV) are never read as a wide gap: every answer is within 2u of the truth, or flagged", () => {
    for (const x of category("nearly-closed", 12)) {
      expect(x.p.status).toBe("ok");
      expect(honest(x)).toBe(true);
      // No wide gap without a flag (was: a 3 meV gap reported as 120 meV).
      if (x.p.flags.length === 0) expect(x.p.gap_eV!).toBeLessThan(0.05);
    }
  });
  it("a V-shaped spectrum is closed; a 58 meV gap on a tilted floor is not (was: reported as closed within resolution)", () => {
    const v = pickGap(makeSpectrum({ vbEdge_V: 0.011, cbEdge_V: 0.012, T_K: 4.5, vrms_mV: 2, noise: 0.02, seed: 31, amplitude: 10 }));
    expect(v.closed).toBe(true);
    const tilted = pickGap(
      makeSpectrum({ vbEdge_V: -0.02, cbEdge_V: 0.038, T_K: 4.5, vrms_mV: 2, noise: 0.03, seed: 32, amplitude: 8, additive: { linear: 0.8 }, transmission_V: 1 }),
    );
    expect(tilted.closed).toBe(false);
    expect(Math.abs(tilted.gap_eV! - 0.058) * 1000).toBeLessThanOrEqual(Math.max(2000 * tilted.uncertainty_eV!, 3));
  });
  it("the pick returns the baseline it read the edges against, and the threshold's height above it", () => {
    for (const x of category("curved", 6)) {
      const b = x.p.baseline!;
      expect(b.length).toBe(x.e.spectrum.bias_V.length);
      // The floor is the baseline at the quietest point, and the scalar threshold sits k·σ above it.
      expect(Array.from(b)).toContain(x.p.noiseFloor);
      expect(x.p.threshold! - x.p.noiseFloor!).toBeCloseTo(x.p.thresholdOffset!, 12);
      // The curve is the stated polynomial: a degree-0 baseline is flat.
      if (x.p.baselineDegree === 0) expect(Math.max(...b) - Math.min(...b)).toBe(0);
    }
  });
  it("every gross error (> 50 meV) in the realistic mix carries a flag", () => {
    for (const x of category("realistic", 30)) if (x.p.status === "ok" && errMeV(x) > 50) expect(x.p.flags.length).toBeGreaterThan(0);
  });
});

describe("repeats at one point", () => {
  const base = { vbEdge_V: -0.12, cbEdge_V: 0.18, T_K: 4.5, vrms_mV: 2, noise: 0.03, seed: 77 };
  const check = (reps: ReturnType<typeof makeRepeats>) => compareRepeats(reps.map((s) => ({ bias_V: s.bias_V, didv: s.didv, pick: pickGap(s) })));
  it("repeats that differ by noise only raise nothing", () => {
    expect(check(makeRepeats(base, 4)).every((f) => f.length === 0)).toBe(true);
  });
  it("a tip change after the second repeat flags every repeat as a tip change, naming the others", () => {
    const flags = check(makeRepeats(base, 4, { after: 2, edgeShift_V: 0.03, amplitudeFactor: 1.3 }));
    expect(flags.every((f) => f.length === 1 && f[0].code === "tip-change")).toBe(true);
    expect(flags[0][0].message).toMatch(/repeat 3, repeat 4/);
  });
  it("repeats are found by a shared position and setpoint, or a file's 'repeats' line; a grid or a line has none", () => {
    const at = (x: number, y: number, i = 1e-10) => ({ x_nm: x, y_nm: y, setpoint_bias_V: 0.5, setpoint_current_A: i, extra: {} });
    expect(repeatGroups([at(0, 0), at(0, 0), at(1, 0), at(0, 0)])).toEqual([[0, 1, 3]]);
    expect(repeatGroups([at(0, 0), at(1, 0), at(2, 0)])).toEqual([]);
    expect(repeatGroups([at(0, 0), at(0, 0, 2e-10)])).toEqual([]);
    const plain = { setpoint_bias_V: 0.5, setpoint_current_A: 1e-10, extra: {} };
    expect(repeatGroups([plain, plain])).toEqual([]);
    const declared = { ...plain, extra: { repeats: "3" } };
    expect(repeatGroups([declared, declared, declared])).toEqual([[0, 1, 2]]);
  });
});

describe("tilted floors (a linear background in dI/dV)", () => {
  // Before the tilt-aware first look, 8 of these 12 were read from a stretch near one end of the floor:
  // an edge placed hundreds of meV inside the gap with a stated uncertainty of a few meV and no flag.
  it("a plainly tilted floor is read whole: at least 11 of 12 gaps within 2u or 15 meV (the suite's p90 goal)", () => {
    const xs = category("tilted", 12);
    for (const x of xs) expect(x.p.status).toBe("ok");
    // Open: tilted-10 of this seed (a 62 meV error, u 9 meV, no flag) is still read short.
    expect(xs.filter((x) => errMeV(x) <= Math.max(2000 * x.p.uncertainty_eV!, 15)).length).toBeGreaterThanOrEqual(11);
  });
  // Spectra of other draws of the suite that the picker once read confidently wrong (errors of 75–420 meV,
  // u of 9–19 meV, no flag): each is now right within 2u, or flagged with a reason.
  const drawn = (seed: number, c: SuiteCategory, i: number) => {
    const e = makeSuite({ seed, categories: [c] })[i];
    return { e, p: pickGap(e.spectrum) };
  };
  it("a small gap on a steep tilt (the tilted run only 1.6x the flat one) is read whole", () => {
    const x = drawn(3, "tilted", 28);
    expect(errMeV(x)).toBeLessThanOrEqual(2000 * x.p.uncertainty_eV!);
  });
  it("the tilted look is an extraction setting: switched off, that spectrum is read from the flat first look again", () => {
    const { e } = drawn(3, "tilted", 28);
    const off = pickGap(e.spectrum, { baseline: { tiltedLook: false } });
    expect(Math.abs(off.gap_eV! - e.spectrum.truth.gap_eV) * 1000).toBeGreaterThan(50);
  });
  it("a tilted and curved floor: the edge read where the curve crosses the threshold is flagged, with the true onset named", () => {
    const x = drawn(6, "tilted-mix", 23);
    expect(honest(x)).toBe(true);
    const f = x.p.flags.find((f) => f.code === "unreliable-edge" && f.message.includes("conduction-band edge"));
    expect(Math.abs(f!.at_V![0] - x.e.spectrum.truth.cbEdge_V)).toBeLessThan(3 * x.e.spectrum.truth.resolution_mV / 1000);
  });
  it("an edge on a sloped floor with a much sharper onset beyond it is flagged, naming where the onset is", () => {
    const x = drawn(8, "tilted-mix", 34);
    expect(honest(x)).toBe(true);
    const f = x.p.flags.find((f) => f.code === "unreliable-edge" && f.message.includes("more steeply"));
    expect(f).toBeDefined();
    // The sharper rise is the true valence onset (within 3 resolutions).
    expect(Math.abs(f!.at_V![0] - x.e.spectrum.truth.vbEdge_V)).toBeLessThan(3 * x.e.spectrum.truth.resolution_mV / 1000);
  });
  it("a weak onset that goes on as one straight line with a steep floor gets an uncertainty that reaches it, and a flag", () => {
    const x = drawn(3, "tilted-mix", 37);
    expect(x.p.flags.some((f) => f.code === "unreliable-edge" && f.message.includes("straight line"))).toBe(true);
    expect(Math.abs(x.p.vbEdge_V! - x.e.spectrum.truth.vbEdge_V)).toBeLessThanOrEqual(2 * x.p.vbSigma_V!);
  });
  it("'no gap' with a clear edge on one side only is flagged (a hidden onset cannot be told from no band)", () => {
    const x = drawn(2, "tilted-mix", 5);
    expect(x.p.gap_eV).toBeNull();
    expect(x.p.flags.some((f) => f.code === "unreliable-edge" && f.message.includes("no valence-band edge"))).toBe(true);
    // A metal stays unflagged: it has no edge on either side.
    for (const m of category("metal", 4)) expect(m.p.flags.filter((f) => f.code === "unreliable-edge")).toEqual([]);
  });
  it("a tilt with other imperfections: right within 2u or flagged, never 'closed'", () => {
    for (const x of category("tilted-mix", 12)) {
      expect(honest(x)).toBe(true);
      expect(x.p.closed).toBe(false);
    }
  });
});
