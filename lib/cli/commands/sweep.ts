/**
 * bandcross sweep FILE... --tip-work-function EV --sample-work-function EV [--contact-distance NM] [--json]
 * Picks the gap of every spectrum, estimates distance and field from each setpoint, and fits the
 * critical field (V-shape against a monotonic line).
 */
import { DEFAULT_FIELD_MODEL, estimateField, fieldAssumptions, fieldModelSchema, fitSweep, type FieldModel } from "../../spectra";
import type { Command } from "../io";
import { CliUsageError } from "../io";
import { analyseFiles, extractionOptions, gapCells, noteOf, numberOption, parse, settingsFromOptions, table, type Entry } from "../shared";

const usage = `usage: bandcross sweep FILE... --tip-work-function EV --sample-work-function EV [options]
  --tip-work-function EV          tip work function Φ_tip (required)
  --sample-work-function EV       sample work function Φ_sample (required)
  --contact-distance NM           distance at which the junction conducts G₀ (default ${DEFAULT_FIELD_MODEL.contactDistance_nm})
  --tip-work-function-sigma EV    uncertainty of Φ_tip (default ${DEFAULT_FIELD_MODEL.tipWorkFunctionSigma_eV})
  --sample-work-function-sigma EV uncertainty of Φ_sample (default ${DEFAULT_FIELD_MODEL.sampleWorkFunctionSigma_eV})
  --contact-distance-sigma NM     uncertainty of the contact distance (default ${DEFAULT_FIELD_MODEL.contactDistanceSigma_nm})
  --barrier-height EV             measured apparent barrier height (default: mean of the work functions)
  --barrier-height-sigma EV       its standard uncertainty (default 0)
  --assumed-barrier-sigma EV      without --barrier-height, how far the barrier may lie from that mean
                                  (default ${DEFAULT_FIELD_MODEL.assumedBarrierSigma_eV})
  --screening S                   divide the field by S ≥ 1 (default 1, none)
  --json                          print JSON instead of tables
  --settings F                    extraction settings as JSON (partial; the rest are defaults)
  --threshold-k K                 threshold multiplier k (edge at floor + k·σ)
  --no-fit                        threshold edges without the broadening-aware fit
exit status: 0 when every file was read, 1 when any was rejected, 2 for a usage error`;

interface SweepEntry extends Entry {
  distance_nm: number | null;
  distanceSigma_nm: number | null;
  field_V_per_nm: number | null;
  fieldSigma_V_per_nm: number | null;
}

export const sweep: Command = {
  name: "sweep",
  summary: "gap versus estimated field and the critical field of a sweep",
  usage,
  async run(argv, io) {
    const { values, positionals } = parse(argv, {
      ...extractionOptions,
      "tip-work-function": { type: "string" },
      "sample-work-function": { type: "string" },
      "contact-distance": { type: "string" },
      "tip-work-function-sigma": { type: "string" },
      "sample-work-function-sigma": { type: "string" },
      "contact-distance-sigma": { type: "string" },
      "barrier-height": { type: "string" },
      "barrier-height-sigma": { type: "string" },
      "assumed-barrier-sigma": { type: "string" },
      screening: { type: "string" },
    });
    if (values.help) {
      io.out(usage + "\n");
      return 0;
    }
    if (positionals.length === 0) throw new CliUsageError("no files given");
    const tip = numberOption(values["tip-work-function"], "tip-work-function");
    const sample = numberOption(values["sample-work-function"], "sample-work-function");
    if (tip === undefined || sample === undefined) throw new CliUsageError("--tip-work-function and --sample-work-function are required");
    const candidate = {
      ...DEFAULT_FIELD_MODEL,
      tipWorkFunction_eV: tip,
      sampleWorkFunction_eV: sample,
      ...defined({
        contactDistance_nm: numberOption(values["contact-distance"], "contact-distance"),
        tipWorkFunctionSigma_eV: numberOption(values["tip-work-function-sigma"], "tip-work-function-sigma"),
        sampleWorkFunctionSigma_eV: numberOption(values["sample-work-function-sigma"], "sample-work-function-sigma"),
        contactDistanceSigma_nm: numberOption(values["contact-distance-sigma"], "contact-distance-sigma"),
        barrierHeight_eV: numberOption(values["barrier-height"], "barrier-height"),
        barrierHeightSigma_eV: numberOption(values["barrier-height-sigma"], "barrier-height-sigma"),
        assumedBarrierSigma_eV: numberOption(values["assumed-barrier-sigma"], "assumed-barrier-sigma"),
        screening: numberOption(values.screening, "screening"),
      }),
    };
    const parsed = fieldModelSchema.safeParse(candidate);
    if (!parsed.success) {
      const iss = parsed.error.issues[0];
      throw new CliUsageError(`invalid field model: ${iss.path.join(".")}: ${iss.message}`);
    }
    const model: FieldModel = parsed.data;
    const settings = settingsFromOptions(values);
    const results = await analyseFiles(positionals, settings, io.err);
    const entries: SweepEntry[] = [];
    const points: Parameters<typeof fitSweep>[0] = [];
    for (const r of results) {
      const e: SweepEntry = { ...r.entry, distance_nm: null, distanceSigma_nm: null, field_V_per_nm: null, fieldSigma_V_per_nm: null };
      if (r.spectrum && e.status !== "error") {
        const m = r.spectrum.meta;
        if (m.setpoint_bias_V === undefined || m.setpoint_current_A === undefined) {
          e.warnings = [...e.warnings, "no setpoint bias/current in the metadata: no distance or field; left out of the fit"];
        } else {
          try {
            const f = estimateField(model, m);
            e.distance_nm = f.distance_nm;
            e.distanceSigma_nm = f.distanceSigma_nm;
            e.field_V_per_nm = f.field_V_per_nm;
            e.fieldSigma_V_per_nm = f.fieldSigma_V_per_nm;
            if (e.status === "ok" && r.pick && r.pick.gap_eV !== null) {
              points.push({ field_V_per_nm: f.field_V_per_nm, fieldSigma_V_per_nm: f.fieldSigma_V_per_nm, gap_eV: r.pick.gap_eV, gapSigma_eV: r.pick.uncertainty_eV });
            }
          } catch (err) {
            e.warnings = [...e.warnings, `no field estimate: ${(err as Error).message}`];
          }
        }
      }
      entries.push(e);
    }
    const c = fitSweep(points);
    const crossing = {
      state: c.state,
      found: c.found,
      field_V_per_nm: c.field_V_per_nm,
      ci95_V_per_nm: c.ci95_V_per_nm,
      ci95Total_V_per_nm: c.ci95Total_V_per_nm,
      slopes: c.slopes,
      extrapolated_V_per_nm: c.extrapolated_V_per_nm,
      comparison: c.comparison,
      n: c.n,
      reasons: c.reasons,
    };
    const failed = entries.some((e) => e.status === "error");
    if (values.json) {
      io.out(JSON.stringify({ spectra: entries, crossing, fieldModel: model, assumptions: fieldAssumptions(model) }, null, 2) + "\n");
    } else {
      const f = (v: number | null, d: number) => (v === null ? "—" : v.toFixed(d));
      const rows = [["file", "#", "status", "VB edge (mV)", "CB edge (mV)", "gap (meV)", "res. (meV)", "d (nm)", "E (V/nm)", "note"]];
      for (const e of entries) rows.push([e.file, e.index === null ? "—" : String(e.index), e.status, ...gapCells(e), f(e.distance_nm, 3), f(e.field_V_per_nm, 3), noteOf(e)]);
      io.out(table(rows));
      io.out("\n");
      if (c.state === "crossed") {
        io.out(`critical field: ${c.field_V_per_nm!.toFixed(3)} V/nm, 95% interval ${c.ci95_V_per_nm![0].toFixed(3)}–${c.ci95_V_per_nm![1].toFixed(3)} V/nm`);
        io.out(` (with the field model's uncertainty ${c.ci95Total_V_per_nm![0].toFixed(3)}–${c.ci95Total_V_per_nm![1].toFixed(3)})\n`);
        io.out(`slopes: ${c.slopes!.below.toFixed(3)} below, ${c.slopes!.above.toFixed(3)} above (eV per V/nm); ΔBIC ${c.comparison!.deltaBic.toFixed(1)} for the V over a line\n`);
      } else if (c.state === "closing") {
        io.out(`closing, not yet crossed: the gap extrapolates to zero at ${c.extrapolated_V_per_nm!.toFixed(3)} V/nm\n`);
      } else {
        io.out(`no crossing: ${c.reasons.join("; ") || "the gap does not close"}\n`);
      }
      io.out(`field model: Φ_tip ${model.tipWorkFunction_eV} ± ${model.tipWorkFunctionSigma_eV} eV, Φ_sample ${model.sampleWorkFunction_eV} ± ${model.sampleWorkFunctionSigma_eV} eV, d_c ${model.contactDistance_nm} nm — an estimate, not a measurement\n`);
      const nErr = entries.filter((e) => e.status === "error").length;
      if (nErr) io.err(`${nErr} file${nErr > 1 ? "s" : ""} rejected\n`);
    }
    return failed ? 1 : 0;
  },
};

function defined<T extends Record<string, unknown>>(o: T): Partial<T> {
  return Object.fromEntries(Object.entries(o).filter(([, v]) => v !== undefined)) as Partial<T>;
}
