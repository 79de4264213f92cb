/** Pieces shared by the analysis subcommands: reading files, picking gaps, option parsing, tables. */
import { readFileSync, readdirSync, statSync } from "node:fs";
import { basename, join } from "node:path";
import { parseArgs, type ParseArgsConfig } from "node:util";
import {
  DEFAULT_IMPORT_LIMITS,
  importSpectra,
  resolveExtractionSettings,
  type ExtractionSettings,
  type GapPick,
  type ImportedFile,
  type ParsedSpectrum,
} from "../spectra";
import { CliUsageError } from "./io";
import { pickAll, type ViewInfo } from "./parallel";

export interface GapJson {
  vbEdge_V: number | null;
  cbEdge_V: number | null;
  gap_eV: number | null;
  midgap_V: number | null;
  uncertainty_eV: number | null;
  closed: boolean;
  vbSigma_V: number | null;
  cbSigma_V: number | null;
  resolution_meV: number;
  method: string;
  /** Quality flags: reasons the pick may not be trusted (code and plain-words message). */
  flags: { code: string; message: string }[];
}

export interface Entry {
  file: string;
  index: number | null;
  label: string | null;
  status: "ok" | "no-gap" | "error";
  message: string | null;
  warnings: string[];
  gap: GapJson | null;
  /** With `--average`: the file's spectrum indices averaged into this point, and those left out. */
  averagedFrom?: number[];
  leftOut?: number[];
  /** With a normalisation (`--normalise` or the settings): the view the gap was picked on. */
  normalisation?: NormalisationJson;
}

export interface NormalisationJson {
  method: "feenstra" | "setpoint";
  description: string;
  currentReconstructed: boolean;
}

export interface Analysed {
  entry: Entry;
  spectrum: ParsedSpectrum | null;
  pick: GapPick | null;
}

export interface ParsedArgs {
  values: Record<string, string | boolean | undefined>;
  positionals: string[];
}

export function parse(argv: string[], options: NonNullable<ParseArgsConfig["options"]>): ParsedArgs {
  try {
    const r = parseArgs({ args: argv, options, allowPositionals: true, strict: true });
    return { values: r.values as ParsedArgs["values"], positionals: r.positionals };
  } catch (e) {
    throw new CliUsageError((e as Error).message.replace(/^TypeError \[[A-Z_]+\]: /, ""));
  }
}

export function numberOption(v: unknown, name: string): number | undefined {
  if (v === undefined) return undefined;
  const x = Number(String(v).replace(",", "."));
  if (!Number.isFinite(x)) throw new CliUsageError(`--${name} needs a number, got "${String(v)}"`);
  return x;
}

/** The extraction options both analysing commands take (analyze, sweep). */
export const extractionOptions = {
  json: { type: "boolean" },
  settings: { type: "string" },
  "threshold-k": { type: "string" },
  "no-fit": { type: "boolean" },
  help: { type: "boolean", short: "h" },
} as const;

/** Extraction settings from --settings, --threshold-k and --no-fit over the defaults. */
export function settingsFromOptions(values: ParsedArgs["values"]): ExtractionSettings {
  const k = numberOption(values["threshold-k"], "threshold-k");
  const overrides: Record<string, unknown> = {};
  if (k !== undefined) overrides.threshold = { k };
  if (values["no-fit"]) overrides.fit = { enabled: false };
  return loadSettings(values.settings as string | undefined, overrides);
}

export function loadSettings(path: string | undefined, overrides: Record<string, unknown>): ExtractionSettings {
  let base: unknown = {};
  if (path) {
    let text: string;
    try {
      text = readFileSync(path, "utf8");
    } catch {
      throw new CliUsageError(`cannot read the settings file "${path}"`);
    }
    try {
      base = JSON.parse(text);
    } catch (e) {
      throw new CliUsageError(`settings file "${path}" is not valid JSON (${(e as Error).message})`);
    }
  }
  const merged = { ...(base as object), ...overrides };
  try {
    return resolveExtractionSettings(merged as never);
  } catch (e) {
    const issue = (e as { issues?: { path: (string | number)[]; message: string }[] }).issues?.[0];
    throw new CliUsageError(issue ? `invalid extraction setting ${issue.path.join(".")}: ${issue.message}` : (e as Error).message);
  }
}

/** Files named on the command line; directories are expanded (recursively, sorted). */
export function expandPaths(paths: string[]): string[] {
  const out: string[] = [];
  for (const p of paths) {
    let st;
    try {
      st = statSync(p);
    } catch {
      out.push(p);
      continue;
    }
    if (st.isDirectory()) {
      const walk = (d: string) => {
        for (const name of readdirSync(d).sort()) {
          if (name.startsWith(".")) continue;
          const full = join(d, name);
          if (statSync(full).isDirectory()) walk(full);
          else out.push(full);
        }
      };
      walk(p);
    } else out.push(p);
  }
  return out;
}

export function errorEntry(file: string, message: string): Analysed {
  return { entry: { file, index: null, label: null, status: "error", message, warnings: [], gap: null }, spectrum: null, pick: null };
}

export function gapJson(p: GapPick): GapJson {
  return {
    vbEdge_V: p.vbEdge_V,
    cbEdge_V: p.cbEdge_V,
    gap_eV: p.gap_eV,
    midgap_V: p.midgap_V,
    uncertainty_eV: p.uncertainty_eV,
    closed: p.closed,
    vbSigma_V: p.vbSigma_V,
    cbSigma_V: p.cbSigma_V,
    resolution_meV: p.resolution_meV,
    method: p.method,
    flags: p.flags.map((f) => ({ code: f.code, message: f.message })),
  };
}

/** The bytes of every file named (directories expanded), one at a time, or why one cannot be read. */
export function* readInputs(paths: string[]): Generator<{ name: string; bytes: Uint8Array } | { name: string; error: string }> {
  for (const path of expandPaths(paths)) {
    const name = basename(path);
    try {
      const st = statSync(path);
      if (st.size > DEFAULT_IMPORT_LIMITS.maxFileBytes) yield { name, error: `file is ${st.size} bytes, over the limit of ${DEFAULT_IMPORT_LIMITS.maxFileBytes}` };
      else yield { name, bytes: readFileSync(path) };
    } catch (e) {
      const code = (e as NodeJS.ErrnoException).code;
      const error = code === "ENOENT" ? "no such file" : code === "EACCES" ? "permission denied" : `cannot read the file (${code ?? (e as Error).message})`;
      yield { name, error };
    }
  }
}

/** Read and import every file: its spectra, or an error entry for a file that cannot be read. */
export function importFiles(paths: string[]): (ImportedFile | Analysed)[] {
  const out: (ImportedFile | Analysed)[] = [];
  for (const input of readInputs(paths)) {
    if ("error" in input) {
      out.push(errorEntry(input.name, input.error));
      continue;
    }
    for (const f of importSpectra(input.name, input.bytes)) out.push(f.status === "error" ? errorEntry(f.file, f.message ?? "rejected") : f);
  }
  return out;
}

export function normalisationJson(view: ViewInfo): NormalisationJson | undefined {
  return view.method === "none" ? undefined : { method: view.method, description: view.description, currentReconstructed: view.currentReconstructed };
}

/** The entry of one picked spectrum: its place, warnings (the pick's added), gap and the view it was picked on. */
export function pickedEntry(at: Pick<Entry, "file" | "index" | "label" | "warnings">, pick: GapPick, view: ViewInfo): Entry {
  const normalisation = normalisationJson(view);
  return { ...at, status: pick.status, message: null, warnings: [...at.warnings, ...pick.warnings], gap: gapJson(pick), ...(normalisation ? { normalisation } : {}) };
}

/**
 * Read, import and pick every file (on the view the settings name); one Analysed per spectrum (or per
 * failed file). A file of many spectra is picked on every core (parallel.ts); `warn` hears when it is not.
 */
export async function analyseFiles(paths: string[], settings: ExtractionSettings, warn: (s: string) => void): Promise<Analysed[]> {
  const results: Analysed[] = [];
  for (const f of importFiles(paths)) {
    if ("entry" in f) {
      results.push(f);
      continue;
    }
    const picked = await pickAll(f.spectra, settings, warn);
    f.spectra.forEach((s, k) => {
      const r = picked[k];
      if ("error" in r) {
        results.push({ ...errorEntry(s.file, `spectrum ${s.index + 1}: ${r.error}`), spectrum: s });
        return;
      }
      const at = { file: s.file, index: s.index, label: s.label, warnings: [...f.warnings, ...s.warnings] };
      results.push({ entry: pickedEntry(at, r.pick, r.view), spectrum: s, pick: r.pick });
    });
  }
  return results;
}

const fmt = (v: number | null | undefined, scale: number, digits: number) => (v === null || v === undefined || !Number.isFinite(v) ? "—" : (v * scale).toFixed(digits));

export function table(rows: string[][]): string {
  const w = rows[0].map((_, c) => Math.max(...rows.map((r) => r[c].length)));
  return rows.map((r) => r.map((cell, c) => (c === r.length - 1 ? cell : cell.padEnd(w[c]))).join("  ")).join("\n") + "\n";
}

export function gapCells(e: Entry): string[] {
  const g = e.gap;
  if (!g) return ["—", "—", "—", "—"];
  const gap = g.gap_eV === null ? "—" : g.closed ? `closed (<${g.resolution_meV.toFixed(1)})` : `${fmt(g.gap_eV, 1000, 1)} ± ${fmt(g.uncertainty_eV, 1000, 1)}`;
  return [fmt(g.vbEdge_V, 1000, 1), fmt(g.cbEdge_V, 1000, 1), gap, fmt(g.resolution_meV, 1, 1)];
}

export function noteOf(e: Entry): string {
  if (e.status === "error") return e.message ?? "";
  return e.warnings.length ? e.warnings[0] + (e.warnings.length > 1 ? ` (+${e.warnings.length - 1} more)` : "") : "";
}
