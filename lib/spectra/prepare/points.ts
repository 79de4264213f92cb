/**
 * Which dI/dV columns of one file are repeats of one point (read before averaging):
 *
 * 1. Column names with `point=K` (our own convention, any text around it, e.g. `dI/dV point=1 fwd`,
 *    `dI/dV point=1 bwd`, `dI/dV point=2 fwd` …): the columns with the same K are repeats of point K,
 *    forward and backward sweeps alike. Every dI/dV column of the file must then carry one.
 * 2. Otherwise a metadata line `# repeats: N`: the columns, in order, are N repeats of the first point,
 *    then N of the second, and so on (the number of columns must be a multiple of N).
 * 3. Otherwise every spectrum is a point of its own.
 * Points are numbered from 0 in the order they first appear.
 */
import type { SpectrumMeta } from "../import/types";
import { PrepareError } from "./errors";

export interface PointGroup {
  /** The point, from 0. */
  point: number;
  /** Indices (within the file) of its repeats, ascending. */
  members: number[];
  label: string;
}

export interface PointGroups {
  groups: PointGroup[];
  /** How the repeats were told: `column` (point=K), `metadata` (# repeats: N) or `none`. */
  by: "column" | "metadata" | "none";
}

const POINT = /\bpoint\s*=\s*(\d+)\b/i;

/** The `repeats` metadata value (any capitalisation of the key), or undefined. */
export function declaredRepeats(meta: Pick<SpectrumMeta, "extra">): string | undefined {
  for (const [k, v] of Object.entries(meta.extra ?? {})) if (k.trim().toLowerCase() === "repeats") return v;
  return undefined;
}

export function pointGroups(spectra: { index: number; label: string; meta: Pick<SpectrumMeta, "extra"> }[]): PointGroups {
  const tagged = spectra.map((s) => POINT.exec(s.label));
  if (tagged.some((t) => t)) {
    const missing = spectra.find((_, i) => !tagged[i]);
    if (missing)
      throw new PrepareError(
        `column "${missing.label}" has no point=K while other columns do: name every dI/dV column's point`,
      );
    const byKey = new Map<string, number[]>();
    spectra.forEach((s, i) => {
      const key = String(Number(tagged[i]![1]));
      byKey.set(key, [...(byKey.get(key) ?? []), s.index]);
    });
    return {
      by: "column",
      groups: [...byKey.entries()].map(([key, members], point) => ({ point, members, label: `point=${key}` })),
    };
  }
  const raw = spectra.length ? declaredRepeats(spectra[0].meta) : undefined;
  if (raw !== undefined) {
    const n = Number(raw.trim());
    if (!Number.isInteger(n) || n < 1) throw new PrepareError(`"# repeats: ${raw}" is not a whole number of repeats`);
    if (spectra.length % n !== 0)
      throw new PrepareError(
        `"# repeats: ${n}" but the file has ${spectra.length} dI/dV column${spectra.length === 1 ? "" : "s"}, ` +
          `not a whole number of points of ${n} repeats each`,
      );
    const groups: PointGroup[] = [];
    for (let p = 0; p * n < spectra.length; p++)
      groups.push({ point: p, members: spectra.slice(p * n, (p + 1) * n).map((s) => s.index), label: `point ${p + 1}` });
    return { by: "metadata", groups };
  }
  return { by: "none", groups: spectra.map((s, point) => ({ point, members: [s.index], label: s.label })) };
}
