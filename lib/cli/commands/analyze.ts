/**
 * bandcross analyze FILE... [--json] [--settings FILE] [--threshold-k K] [--no-fit] [--average]
 *   [--normalise none|feenstra|setpoint]
 * Reads every file (text, JSON or zip), picks the band edges of every spectrum (or of every point's
 * average of repeats), prints a table or JSON.
 */
import { NORMALISATIONS, resolveExtractionSettings } from "../../spectra";
import { analyseAveraged } from "../average";
import type { Command } from "../io";
import { CliUsageError } from "../io";
import { analyseFiles, extractionOptions, gapCells, noteOf, parse, settingsFromOptions, table } from "../shared";

const usage = `usage: bandcross analyze FILE... [--json] [--settings FILE] [--threshold-k K] [--no-fit] [--average]
                        [--normalise none|feenstra|setpoint]
  FILE            a spectrum file (csv/tsv/txt, JSON) or a zip of them; a directory is read recursively
  --json          print {"spectra":[…]} instead of a table
  --settings F    extraction settings as JSON (partial; the rest are defaults)
  --threshold-k K threshold multiplier k (edge at floor + k·σ)
  --no-fit        report threshold edges without the broadening-aware fit
  --average       one spectrum per point: the repeats of a file ("# repeats: N", or dI/dV columns named
                  point=K) averaged, an odd repeat left out; adds averagedFrom and leftOut to each entry
  --normalise N   pick on a normalised view: feenstra ((dI/dV)/(I/V), I/V broadened) or setpoint
                  (dI/dV ÷ I_set/V_set); adds a normalisation field to each entry
exit status: 0 when every file was read, 1 when any was rejected, 2 for a usage error`;

export const analyze: Command = {
  name: "analyze",
  summary: "pick band edges and gaps in spectrum files",
  usage,
  async run(argv, io) {
    const { values, positionals } = parse(argv, { ...extractionOptions, average: { type: "boolean" }, normalise: { type: "string" } });
    if (values.help) {
      io.out(usage + "\n");
      return 0;
    }
    if (positionals.length === 0) throw new CliUsageError("no files given");
    let settings = settingsFromOptions(values);
    const normalise = values.normalise as string | undefined;
    if (normalise !== undefined) {
      if (!(NORMALISATIONS as readonly string[]).includes(normalise))
        throw new CliUsageError(`--normalise takes ${NORMALISATIONS.join(", ")}; got "${normalise}"`);
      const method = normalise as (typeof NORMALISATIONS)[number];
      settings = resolveExtractionSettings({ ...settings, normalisation: { ...settings.normalisation, method } });
    }
    const results = values.average ? analyseAveraged(positionals, settings) : await analyseFiles(positionals, settings, io.err);
    const failed = results.some((r) => r.entry.status === "error");
    if (values.json) {
      io.out(JSON.stringify({ spectra: results.map((r) => r.entry) }, null, 2) + "\n");
    } else {
      const rows = [["file", "#", "status", "VB edge (mV)", "CB edge (mV)", "gap (meV)", "res. (meV)", "note"]];
      for (const { entry: e } of results) rows.push([e.file, e.index === null ? "—" : String(e.index), e.status, ...gapCells(e), noteOf(e)]);
      io.out(table(rows));
      const nErr = results.filter((r) => r.entry.status === "error").length;
      if (nErr) io.err(`${nErr} file${nErr > 1 ? "s" : ""} rejected\n`);
    }
    return failed ? 1 : 0;
  },
};
