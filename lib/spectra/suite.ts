/**
 * The named, seeded accuracy suite: spectra with the imperfections real measurements have, in
 * categories, each made by the physical model of synthetic.ts with known band edges. Used by
 * `npm run bench -- accuracy` (every spectrum) and by the unit tests (a few per category).
 *
 * Ranges are chosen to resemble cryogenic STS of 2D films (gaps of tens to hundreds of meV, 1–5 mV rms
 * modulation, 1–4 mV steps, signal-to-noise of the band onsets from about 5 to 100; common practice),
 * not to suit the picker: the same generator with other seeds makes spectra the picker has never seen.
 */
import { makeRng, type Rng } from "./random";
import { makeRepeats, makeSpectrum, type SpectrumModel, type SyntheticSpectrum } from "./synthetic";

export interface SuiteEntry {
  category: SuiteCategory;
  /** Unique, stable name: `<category>-<index>`. */
  name: string;
  spectrum: SyntheticSpectrum;
  /** Repeats at one point share a group name. */
  group?: string;
}

export const SUITE_CATEGORIES = {
  model: "our own model: flat in-gap floor, white noise",
  "edge-states": "flat in-gap density (edge states), 10–40% of the band step",
  "v-in-gap": "V-shaped in-gap density (Dirac-like states inside the gap)",
  "weak-onset": "one onset 5–10× weaker than the other",
  sloped: "linear background added to dI/dV, and bias-dependent transmission",
  curved: "curved (quadratic) background added to dI/dV",
  ar1: "correlated noise, AR(1) with ρ 0.5–0.9",
  pink: "1/f noise",
  drift: "slow baseline wander during the sweep, with white noise",
  glitches: "2–6 single-point glitches of 10–40σ",
  clipped: "saturated (clipped) tops",
  broad: "5–10 mV rms lock-in on 50–100 meV gaps, or 77 K",
  "nearly-closed": "nearly closed V-shaped spectra, true gap 0–8 meV",
  metal: "metals: no gap",
  "tip-step": "a tip change during the sweep (a step in the signal)",
  repeats: "4 repeats at one point; in half of the points a tip change after the second",
  realistic: "two to four of the imperfections above at once",
  tilted: "a plain linear background added to dI/dV (tip states, capacitive leakage), nothing else",
  "tilted-mix": "a tilted background with one to three of the other imperfections at once",
} as const;
export type SuiteCategory = keyof typeof SUITE_CATEGORIES;

const pick = <T>(rng: Rng, xs: readonly T[]): T => xs[Math.floor(rng.uniform() * xs.length)];
const between = (rng: Rng, a: number, b: number) => a + (b - a) * rng.uniform();

/** A plain spectrum of the suite: gap, position, temperature, modulation, step, amplitude and noise. */
function base(rng: Rng, seed: number, gapRange: [number, number] = [0.04, 0.5]): SpectrumModel {
  const gap = between(rng, ...gapRange);
  const mid = between(rng, -0.1, 0.1);
  const amplitude = between(rng, 3, 20);
  return {
    vbEdge_V: mid - gap / 2,
    cbEdge_V: mid + gap / 2,
    T_K: pick(rng, [1.2, 4.5, 4.5, 4.5, 10]),
    vrms_mV: between(rng, 1, 5),
    step_V: pick(rng, [0.001, 0.002, 0.002, 0.004]),
    amplitude,
    // Onset step A·Δ/2 against σ: from about 5 (small gap, strong noise) to several hundred.
    noise: amplitude * between(rng, 0.002, 0.01),
    offset: amplitude * between(rng, 0, 0.01),
    background: { linear: between(rng, -0.4, 0.4), quadratic: between(rng, 0, 1.5) },
    biasMin_V: -0.6,
    biasMax_V: 0.6,
    seed,
  };
}

type Maker = (rng: Rng, seed: number) => SpectrumModel;

/** Each imperfection as a change to a base model (used alone in its category and mixed in "realistic"). */
const imperfections: Record<Exclude<SuiteCategory, "model" | "metal" | "repeats" | "realistic" | "tilted-mix" | "nearly-closed" | "broad">, (m: SpectrumModel, rng: Rng) => SpectrumModel> = {
  "edge-states": (m, rng) => ({ ...m, inGap: { ...m.inGap, level: ((m.cbEdge_V - m.vbEdge_V) / 2) * between(rng, 0.1, 0.4) } }),
  "v-in-gap": (m, rng) => ({ ...m, inGap: { ...m.inGap, vSlope: between(rng, 0.05, 0.3) } }),
  tilted: (m, rng) => ({ ...m, additive: { ...m.additive, linear: (m.amplitude ?? 10) * between(rng, 0.1, 0.5) * (rng.uniform() < 0.5 ? -1 : 1) } }),
  "weak-onset": (m, rng) => (rng.uniform() < 0.7 ? { ...m, onsets: { vb: between(rng, 0.1, 0.2) } } : { ...m, onsets: { cb: between(rng, 0.1, 0.2) } }),
  sloped: (m, rng) => ({
    ...m,
    additive: { ...m.additive, linear: (m.amplitude ?? 10) * between(rng, 0.02, 0.12) * (rng.uniform() < 0.5 ? -1 : 1) },
    transmission_V: between(rng, 0.6, 2),
  }),
  curved: (m, rng) => ({ ...m, additive: { ...m.additive, quadratic: (m.amplitude ?? 10) * between(rng, 0.1, 0.5), linear: (m.amplitude ?? 10) * between(rng, -0.02, 0.02) } }),
  ar1: (m, rng) => ({ ...m, noiseKind: "ar1", rho: between(rng, 0.5, 0.9) }),
  pink: (m) => ({ ...m, noiseKind: "pink" }),
  drift: (m, rng) => ({ ...m, drift: { amplitude: (m.noise ?? 0.02) * between(rng, 0.5, 2) } }),
  glitches: (m, rng) => ({ ...m, glitches: 2 + Math.floor(5 * rng.uniform()), glitchSize: between(rng, 10, 40) }),
  clipped: (m, rng) => ({ ...m, clipAt: between(rng, 0.5, 0.8) }),
  "tip-step": (m, rng) => {
    // The step falls inside a band (outside the gap), where a real tip change is seen as a jump.
    const side = rng.uniform() < 0.5;
    const at = side ? m.cbEdge_V + between(rng, 0.08, 0.2) : m.vbEdge_V - between(rng, 0.08, 0.2);
    return { ...m, tipStep: { at_V: at, relative: between(rng, -0.25, 0.25) } };
  },
};

const makers: Partial<Record<SuiteCategory, Maker>> = {
  model: (rng, seed) => base(rng, seed),
  broad: (rng, seed) =>
    rng.uniform() < 0.6 ? { ...base(rng, seed, [0.05, 0.1]), vrms_mV: between(rng, 5, 10), T_K: 4.5 } : { ...base(rng, seed, [0.1, 0.5]), T_K: 77 },
  "nearly-closed": (rng, seed) => ({ ...base(rng, seed, [0, 0.008]), inGap: { vSlope: between(rng, 0, 0.2) } }),
  metal: (rng, seed) => ({ ...base(rng, seed), metal: true, inGap: { level: between(rng, 0.05, 0.3), vSlope: between(rng, 0, 0.5) } }),
};
for (const [name, change] of Object.entries(imperfections)) makers[name as SuiteCategory] = (rng, seed) => change(base(rng, seed), rng);

const COUNTS: Record<SuiteCategory, number> = {
  model: 30,
  "edge-states": 30,
  "v-in-gap": 30,
  "weak-onset": 30,
  sloped: 30,
  curved: 30,
  ar1: 30,
  pink: 30,
  drift: 30,
  glitches: 20,
  clipped: 20,
  broad: 20,
  "nearly-closed": 20,
  metal: 20,
  "tip-step": 20,
  repeats: 20,
  realistic: 60,
  tilted: 30,
  "tilted-mix": 40,
};

/**
 * The suite. `seed` selects the draw (the bench uses its own; tests use theirs); `perCategory` caps the
 * count of each category (tests take a few).
 */
export function makeSuite(opts: { seed?: number; perCategory?: number; categories?: SuiteCategory[] } = {}): SuiteEntry[] {
  const seed0 = opts.seed ?? 15_000;
  const cats = opts.categories ?? (Object.keys(SUITE_CATEGORIES) as SuiteCategory[]);
  const out: SuiteEntry[] = [];
  const all = Object.keys(SUITE_CATEGORIES) as SuiteCategory[];
  for (const category of cats) {
    // Seeds follow the category's place in the full list, so a subset draws the same spectra.
    const ci = all.indexOf(category);
    const rng = makeRng(seed0 * 31 + ci * 7_919);
    const count = Math.min(COUNTS[category], opts.perCategory ?? Infinity);
    const seedOf = (k: number) => seed0 * 10_000 + ci * 1_000 + k;
    if (category === "repeats") {
      for (let g = 0; out.filter((e) => e.category === "repeats").length < count; g++) {
        const m = base(rng, seedOf(g));
        const change = g % 2 === 1 ? { after: 2, edgeShift_V: between(rng, 0.02, 0.06) * (rng.uniform() < 0.5 ? -1 : 1), amplitudeFactor: between(rng, 0.6, 1.5) } : undefined;
        const reps = makeRepeats(m, 4, change);
        reps.forEach((spectrum, k) => {
          if (out.filter((e) => e.category === "repeats").length < count) out.push({ category, name: `repeats-${g}.${k}`, spectrum, group: `repeats-${g}` });
        });
      }
      continue;
    }
    if (category === "realistic" || category === "tilted-mix") {
      // The mix draws from the imperfections that existed when it was made (a category added later
      // would change every mixed spectrum of the seed); "tilted-mix" always holds a tilt.
      const names = (Object.keys(imperfections) as (keyof typeof imperfections)[]).filter((c) => c !== "tilted");
      const tilt = category === "tilted-mix";
      for (let k = 0; k < count; k++) {
        let m = base(rng, seedOf(k));
        const howMany = (tilt ? 1 : 2) + Math.floor(3 * rng.uniform());
        const chosen = new Set<keyof typeof imperfections>();
        if (tilt) chosen.add("tilted");
        while (chosen.size < howMany) chosen.add(pick(rng, names));
        // Only one noise kind at a time.
        if (chosen.has("ar1") && chosen.has("pink")) chosen.delete("pink");
        for (const c of chosen) m = imperfections[c](m, rng);
        out.push({ category, name: `${category}-${k}`, spectrum: makeSpectrum(m) });
      }
      continue;
    }
    const make = makers[category]!;
    for (let k = 0; k < count; k++) out.push({ category, name: `${category}-${k}`, spectrum: makeSpectrum(make(rng, seedOf(k))) });
  }
  return out;
}
