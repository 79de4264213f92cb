import { describe, expect, it } from "vitest";
import type { PhaseData, PhasePoint } from "@/components/review/phase-figure";
import { packPhase, unpackPhase } from "@/components/review/phase-pack";

function phase(n: number): PhaseData {
  const points: PhasePoint[] = Array.from({ length: n }, (_, i) => ({
    spectrumId: `00000000-0000-4000-8000-${String(i).padStart(12, "0")}`,
    field_V_per_nm: Number((0.6 + (0.8 * i) / n).toPrecision(6)),
    fieldSigma_V_per_nm: i % 7 === 0 ? null : 0.157,
    distance_nm: Number((1.2 - (0.5 * i) / n).toPrecision(6)),
    setpointConductance_S: i % 11 === 0 ? null : Number((1e-10 * (1 + i / 100)).toPrecision(5)),
    gap_eV: Number((Math.abs(0.15 - (0.3 * i) / n) + 0.001).toFixed(7)),
    gapSigma_eV: 0.0006 + (i % 13) * 1e-5,
    closed: i % 17 === 0,
    source: i % 5 === 0 ? "corrected" : "auto",
    excluded: i % 23 === 0,
    accepted: i % 29 === 0,
    region: i % 3 === 0 ? null : i % 3 === 1 ? "terrace A" : "step edge",
    // A few flagged picks, each with a message of its own; most carry none.
    flags: i % 29 === 0 ? [{ code: "glitch", message: `1 single-point spike replaced before picking, at ${i} mV`, at_V: [i / 1000] }] : [],
    excludedByFlag: i % 58 === 0,
  }));
  return { sample: { id: "s1", name: "GX-12 bilayer" }, points, crossing: { state: "none" } } as unknown as PhaseData;
}

describe("packPhase / unpackPhase", () => {
  it("gives back exactly the points it was given, nulls and flags included", () => {
    for (const n of [0, 1, 70, 5000]) {
      const d = phase(n);
      const back = unpackPhase(JSON.parse(JSON.stringify(packPhase(d))));
      expect(back).toEqual(d);
    }
  });

  it("gives the many empty flag lists once, as one dictionary entry", () => {
    const packed = packPhase(phase(70));
    const flags = packed.columns.flags as { dict: unknown[]; index: number[] };
    // Points 0, 29 and 58 are flagged (three messages), the other 67 share one `[]`.
    expect(flags.dict).toHaveLength(4);
    expect(flags.index.filter((i) => i === flags.index[1])).toHaveLength(67);
  });

  it("sends a 5,000-point sample in well under half the JSON of the objects", () => {
    const d = phase(5000);
    const objects = JSON.stringify(d).length;
    const packed = JSON.stringify(packPhase(d)).length;
    expect(packed / objects).toBeLessThan(0.45);
  });
});
