/**
 * `analyze --average`: the repeats of each point of a file (`# repeats: N`, or dI/dV columns named
 * `point=K`; lib/spectra/prepare/points.ts) averaged into one spectrum, its gap picked on the view the
 * settings name. One entry per point: `index` is the point (from 0), `averagedFrom` the file's spectrum
 * indices averaged and `leftOut` those left out, with the reasons in `warnings`.
 */
import { averageSpectra, pickOnView, pointGroups, type ExtractionSettings, type ParsedSpectrum } from "../spectra";
import { type Analysed, errorEntry, importFiles, pickedEntry } from "./shared";

function averagePoint(file: string, label: string, point: number, members: ParsedSpectrum[], settings: ExtractionSettings, fileWarnings: string[]): Analysed {
  const one = members.length === 1;
  const avg = one
    ? null
    : averageSpectra(members.map((s) => ({ bias_V: s.bias_V, didv: s.didv, current_A: s.current_A, meta: s.meta, label: s.label })));
  const first = members[0];
  const used = avg ? avg.averagedFrom.map((k) => members[k]) : members;
  const spectrum: ParsedSpectrum = avg
    ? { ...first, index: point, label, bias_V: avg.bias_V, didv: avg.didv, current_A: avg.current_A, warnings: [...new Set(used.flatMap((s) => s.warnings))] }
    : { ...first, index: point, label };
  const { pick, view } = pickOnView({ ...spectrum, stderr: avg?.stderr ?? null }, settings);
  const warnings = [...fileWarnings, ...spectrum.warnings];
  if (one) warnings.push("a single spectrum at this point: nothing to average");
  else warnings.push(`average of ${used.length} repeats`, ...avg!.warnings);
  return {
    entry: {
      ...pickedEntry({ file, index: point, label, warnings }, pick, view),
      averagedFrom: used.map((s) => s.index),
      leftOut: avg ? avg.leftOut.map((l) => members[l.index].index) : [],
    },
    spectrum,
    pick,
  };
}

/** Read, import, average the repeats of each point and pick; one Analysed per point (or per failure). */
export function analyseAveraged(paths: string[], settings: ExtractionSettings): Analysed[] {
  const results: Analysed[] = [];
  for (const f of importFiles(paths)) {
    if ("entry" in f) {
      results.push(f);
      continue;
    }
    let groups;
    try {
      groups = pointGroups(f.spectra);
    } catch (e) {
      results.push(errorEntry(f.file, (e as Error).message));
      continue;
    }
    const fileWarnings = [...f.warnings];
    if (groups.by === "none") fileWarnings.push('no repeats declared (a "# repeats: N" line or columns named point=K): each spectrum is its own point');
    for (const g of groups.groups) {
      const members = g.members.map((i) => f.spectra.find((s) => s.index === i)!);
      try {
        results.push(averagePoint(f.file, g.label, g.point, members, settings, fileWarnings));
      } catch (e) {
        const failed = errorEntry(f.file, `${g.label}: ${(e as Error).message}`);
        failed.entry.index = g.point;
        results.push(failed);
      }
    }
  }
  return results;
}
