import { readNumber } from "@/lib/schemas/number";

/**
 * A number field's value, read as every input reads numbers (`readNumber`): null when blank, the
 * number (a decimal comma accepted), or else the text as typed, which the server refuses with its
 * own message ("must be a number"); a NaN would travel as null and read as "blank".
 */
function num(v: FormDataEntryValue | null): number | string | null {
  const x = readNumber(v === null ? "" : String(v));
  return x === undefined ? null : (x as number | string);
}

const note = (f: FormData) => String(f.get("note") ?? "") || undefined;

/** The extraction settings form's body for `PUT /samples/{id}/extraction-settings`. */
export function settingsBody(f: FormData) {
  return {
    settings: {
      smoothing: {
        method: f.get("method"),
        window_mV: num(f.get("window_mV")),
        order: num(f.get("order")),
        gaussianSigma_mV: num(f.get("gaussianSigma_mV")),
        fftCutoff_mV: num(f.get("fftCutoff_mV")),
      },
      threshold: { k: num(f.get("k")), consecutive: num(f.get("consecutive")), sustain_mV: num(f.get("sustain_mV")) },
      baseline: { maxDegree: num(f.get("maxDegree")), tiltedLook: f.get("tiltedLook") === "on" },
      search: { minBias_V: num(f.get("minBias_V")), maxBias_V: num(f.get("maxBias_V")) },
      fit: { enabled: f.get("fit") === "on" },
      normalisation: { method: f.get("normalisation"), broadening_mV: num(f.get("broadening_mV")) },
    },
    note: note(f),
  };
}

/** "session:<id>", "tip:<id>" or "set:" (the ticked curves) from the curves' select, as the body's scope and ids. */
function curveChoiceBody(v: string, ticked: string[]) {
  const [scope, id] = v.split(":");
  if (scope === "set") return { curveScope: "set", curveIds: ticked };
  if (scope === "tip") return { curveScope: "tip", curveTipId: id };
  if (scope === "session") return { curveScope: "session", curveSessionId: id };
  return {};
}

/** The field model form's body for `PUT /samples/{id}/field-model`. */
export function fieldModelBody(f: FormData) {
  const source = String(f.get("decayConstantSource"));
  return {
    // Blank here is left out: the server's default, or its "must be a number" where none applies.
    contactDistance_nm: num(f.get("contactDistance_nm")) ?? undefined,
    contactDistanceSigma_nm: num(f.get("contactDistanceSigma_nm")) ?? undefined,
    decayConstantSource: source,
    barrierHeight_eV: source === "measured" ? num(f.get("barrierHeight_eV")) : null,
    ...(source === "curves" ? curveChoiceBody(String(f.get("curveChoice") ?? ""), f.getAll("curveIds").map(String)) : {}),
    assumedBarrierSigma_eV: num(f.get("assumedBarrierSigma_eV")) ?? undefined,
    screening: num(f.get("screening")) ?? undefined,
    note: note(f),
  };
}

const FROM_RESOLUTION = "blank: from the resolution";
const SUSTAIN_HINT = "a band edge stays above the threshold this long";

/**
 * The extraction settings' number fields in form order: where the value sits in the settings (and
 * the server's error for it), the words, and whether blank is a value of its own (shown empty).
 */
export const SETTINGS_NUMBERS: {
  name: string;
  at: [string, string];
  label: string;
  unit?: string;
  hint?: string;
  blank?: true;
}[] = [
  {
    name: "window_mV",
    at: ["smoothing", "window_mV"],
    label: "SG window",
    unit: "mV",
    hint: FROM_RESOLUTION,
    blank: true,
  },
  { name: "order", at: ["smoothing", "order"], label: "SG order" },
  {
    name: "gaussianSigma_mV",
    at: ["smoothing", "gaussianSigma_mV"],
    label: "Gaussian σ",
    unit: "mV",
    hint: FROM_RESOLUTION,
    blank: true,
  },
  {
    name: "fftCutoff_mV",
    at: ["smoothing", "fftCutoff_mV"],
    label: "FFT cutoff",
    unit: "mV",
    hint: "shortest period kept",
    blank: true,
  },
  { name: "k", at: ["threshold", "k"], label: "Threshold k", hint: "edge at baseline + k·σ" },
  { name: "consecutive", at: ["threshold", "consecutive"], label: "Consecutive points" },
  { name: "sustain_mV", at: ["threshold", "sustain_mV"], label: "Sustained rise", unit: "mV", hint: SUSTAIN_HINT },
  {
    name: "maxDegree",
    at: ["baseline", "maxDegree"],
    label: "Baseline degree",
    hint: "highest: 0 flat, 1 sloped, 2 curved",
  },
  {
    name: "minBias_V",
    at: ["search", "minBias_V"],
    label: "Search from",
    unit: "V",
    hint: "blank: whole spectrum",
    blank: true,
  },
  { name: "maxBias_V", at: ["search", "maxBias_V"], label: "Search to", unit: "V", blank: true },
  {
    name: "broadening_mV",
    at: ["normalisation", "broadening_mV"],
    label: "I/V broadening ΔV",
    unit: "mV",
    hint: "Feenstra: comparable to the gap",
  },
];
