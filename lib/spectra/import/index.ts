/**
 * importSpectra: bytes of one uploaded file → one ImportedFile per file or zip entry, each with its
 * spectra or a message that says what is wrong (and where). Formats: delimited text (delimited.ts),
 * our JSON shape (json.ts), zip archives of these (zip.ts). Limits: DEFAULT_IMPORT_LIMITS.
 */
import { DEFAULT_IMPORT_LIMITS, resolveImportLimits } from "../settings";
import { energyResolution_mV } from "../resolution";
import { savgolFilter } from "../smooth/savgol";
import { oddWindow } from "../smooth/apply";
import { cleanAxis } from "./clean";
import { decodeText } from "./decode";
import { parseDelimited } from "./delimited";
import { parseJsonSpectra } from "./json";
import { isZip, readArchive } from "./zip";
import { applyGridPositions } from "./grid";
import { fileKind, importApproachCurves, type ImportedCurveFile } from "./approach";
import { ImportError, type ImportLimits, type ImportedFile, type ParsedSpectrum, type SpectrumMeta } from "./types";

export type { ImportLimits, ImportedFile, ParsedSpectrum, SpectrumMeta } from "./types";
export { ImportError } from "./types";
export { DEFAULT_IMPORT_LIMITS };

const cloneMeta = (m: SpectrumMeta): SpectrumMeta => ({ ...m, extra: { ...m.extra } });

/**
 * Bias applied to the tip instead of the sample (`# bias applied to: tip`, `# bias_on: tip`): the
 * analysis works in sample bias, so the signs are flipped (a tip bias V is a sample bias −V).
 */
function biasOnTip(meta: SpectrumMeta): boolean {
  return Object.entries(meta.extra).some(([k, v]) => /^bias[ _-]?(on|applied[ _-]?to|electrode)$/i.test(k.trim()) && /^tip$/i.test(v.trim()));
}

function flipBias(bias: Float64Array, cols: Float64Array[]): { bias: Float64Array; cols: Float64Array[] } {
  const n = bias.length;
  const b = new Float64Array(n);
  for (let i = 0; i < n; i++) b[i] = -bias[n - 1 - i];
  return { bias: b, cols: cols.map((c) => Float64Array.from(c).reverse()) };
}

/**
 * dI/dV from a current trace: Savitzky–Golay first derivative (order 2) over a window of 1.5× the
 * resolution from the metadata (at least 5 points), in A/V = S.
 */
export function derivativeOfCurrent(bias: Float64Array, current: Float64Array, meta: SpectrumMeta): { didv: Float64Array; note: string } {
  const n = bias.length;
  const step = (bias[n - 1] - bias[0]) / (n - 1);
  const res = energyResolution_mV(meta.temperature_K ?? 4.5, meta.lockin_modulation_mV_rms ?? 0);
  const w = oddWindow((1.5 * res) / 1000, step, 5, n);
  return {
    didv: savgolFilter(current, w, Math.min(2, w - 1), 1, step),
    note: `dI/dV computed as the Savitzky–Golay derivative of the current (${w} points, order 2)`,
  };
}

function fromText(file: string, text: string, limits: ImportLimits): ImportedFile {
  const t = parseDelimited(text, limits);
  const bi = t.columns.findIndex((c) => c.role === "bias");
  const didvIdx = t.columns.map((c, i) => (c.role === "didv" ? i : -1)).filter((i) => i >= 0);
  const curIdx = t.columns.map((c, i) => (c.role === "current" ? i : -1)).filter((i) => i >= 0);
  const fileWarnings = [...t.warnings];
  const useCurrent = didvIdx.length === 0;
  const valueIdx = useCurrent ? curIdx : didvIdx;
  if (valueIdx.length === 0) throw new ImportError("no dI/dV or current column besides the bias");
  // One current column next to several dI/dV columns is kept only when it pairs with a single spectrum.
  const pairedCurrent = !useCurrent && curIdx.length === 1 && didvIdx.length === 1 ? curIdx[0] : -1;
  const bias = t.values[bi];
  // Columns with missing values are cleaned on their own; the others share one cleaned axis.
  const hasNaN = (c: Float64Array) => {
    for (let i = 0; i < c.length; i++) if (Number.isNaN(c[i])) return true;
    return false;
  };
  const spectra: ParsedSpectrum[] = [];
  const clean = valueIdx.filter((ci) => !hasNaN(t.values[ci]) && !(pairedCurrent >= 0 && hasNaN(t.values[pairedCurrent])));
  const shared = new Map<number, { bias: Float64Array; col: Float64Array; cur: Float64Array | null; warnings: string[] }>();
  if (clean.length) {
    const cols = clean.map((ci) => t.values[ci]);
    if (pairedCurrent >= 0) cols.push(t.values[pairedCurrent]);
    const r = cleanAxis(bias, cols, t.lines, limits.minPoints, limits.maxPoints);
    fileWarnings.push(...r.warnings);
    clean.forEach((ci, k) => shared.set(ci, { bias: r.bias, col: r.cols[k], cur: pairedCurrent >= 0 ? r.cols[clean.length] : null, warnings: [] }));
  }
  for (const ci of valueIdx) {
    if (shared.has(ci)) continue;
    const cols = [t.values[ci]];
    if (pairedCurrent >= 0) cols.push(t.values[pairedCurrent]);
    let r;
    try {
      r = cleanAxis(bias, cols, t.lines, limits.minPoints, limits.maxPoints);
    } catch (e) {
      if (e instanceof ImportError) throw new ImportError(`column ${ci + 1} ("${t.columns[ci].name}"): ${e.message}`);
      throw e;
    }
    shared.set(ci, { bias: r.bias, col: r.cols[0], cur: pairedCurrent >= 0 ? r.cols[1] : null, warnings: r.warnings });
  }
  const tip = biasOnTip(t.meta);
  if (tip) {
    fileWarnings.push("bias applied to the tip: signs flipped to sample bias");
    const flipped = new Map<Float64Array, Float64Array>();
    for (const [ci, s] of shared) {
      let b = flipped.get(s.bias);
      const cols = [s.col, ...(s.cur ? [s.cur] : [])];
      const r = flipBias(s.bias, cols);
      if (!b) {
        b = r.bias;
        flipped.set(s.bias, b);
      }
      // The current changes sign with the bias; dI/dV does not (both numerator and denominator flip).
      const col = useCurrent ? r.cols[0].map((v) => -v) : r.cols[0];
      shared.set(ci, { bias: b, col, cur: s.cur ? r.cols[1].map((v) => -v) : null, warnings: s.warnings });
    }
  }
  valueIdx.forEach((ci, index) => {
    const s = shared.get(ci)!;
    const meta = cloneMeta(t.meta);
    const warnings = [...s.warnings];
    let didv = s.col;
    let current = s.cur;
    if (useCurrent) {
      current = s.col;
      const d = derivativeOfCurrent(s.bias, s.col, meta);
      didv = d.didv;
      warnings.push(d.note);
    }
    const c = t.columns[ci];
    spectra.push({ file, index, label: valueIdx.length === 1 ? c.name || "spectrum 1" : c.name || `spectrum ${index + 1}`, bias_V: s.bias, didv, current_A: current, meta, warnings });
  });
  if (spectra.length > 1) fileWarnings.push(...applyGridPositions(spectra, t.meta));
  return { file, status: "ok", warnings: fileWarnings, spectra };
}

function fromJson(file: string, text: string, limits: ImportLimits): ImportedFile {
  const js = parseJsonSpectra(text);
  const spectra: ParsedSpectrum[] = js.map((s, index) => {
    const cols = [s.didv ?? s.current!];
    if (s.didv && s.current) cols.push(s.current);
    if (s.bias.length > limits.maxPoints) throw new ImportError(`spectra[${index}]: ${s.bias.length} points exceed the limit of ${limits.maxPoints}`);
    let r;
    try {
      r = cleanAxis(s.bias, cols, null, limits.minPoints, limits.maxPoints);
    } catch (e) {
      if (e instanceof ImportError) throw new ImportError(`spectra[${index}] ("${s.label}"): ${e.message}`);
      throw e;
    }
    const warnings = [...s.warnings, ...r.warnings];
    if (biasOnTip(s.meta)) {
      const fl = flipBias(r.bias, r.cols);
      r = { ...r, bias: fl.bias, cols: fl.cols.map((c, k) => (k === 0 && s.didv ? c : c.map((v) => -v))) };
      warnings.push("bias applied to the tip: signs flipped to sample bias");
    }
    let didv = r.cols[0];
    let current: Float64Array | null = s.didv && s.current ? r.cols[1] : null;
    if (!s.didv) {
      current = r.cols[0];
      const d = derivativeOfCurrent(r.bias, current, s.meta);
      didv = d.didv;
      warnings.push(d.note);
    }
    return { file, index, label: s.label, bias_V: r.bias, didv, current_A: current, meta: s.meta, warnings };
  });
  return { file, status: "ok", warnings: [], spectra };
}

function importOne(file: string, bytes: Uint8Array, limits: ImportLimits): ImportedFile {
  try {
    if (bytes.length > limits.maxFileBytes) throw new ImportError(`file is ${bytes.length} bytes, over the limit of ${limits.maxFileBytes}`);
    const { text } = decodeText(bytes);
    const head = text.trimStart();
    const isJson = /\.json$/i.test(file) || head.startsWith("{") || head.startsWith("[");
    return isJson ? fromJson(file, text, limits) : fromText(file, text, limits);
  } catch (e) {
    if (e instanceof ImportError) return { file, status: "error", message: e.message, warnings: [], spectra: [] };
    return { file, status: "error", message: `could not read the file: ${(e as Error)?.message ?? String(e)}`, warnings: [], spectra: [] };
  }
}

/**
 * Read one uploaded file (or archive) into spectra.
 * @param name the file's name as uploaded (used in messages and as `file` of each entry)
 * @param bytes its content
 * @param limits overrides of DEFAULT_IMPORT_LIMITS
 * @returns one entry per file (per zip entry for an archive); a whole-archive problem gives one error entry
 */
export function importSpectra(name: string, bytes: Uint8Array, limits?: Partial<ImportLimits>): ImportedFile[] {
  const lim = resolveImportLimits(limits);
  if (!isZip(bytes) && !/\.zip$/i.test(name)) return [importOne(name, bytes, lim)];
  const fail = (file: string, message: string): ImportedFile => ({ file, status: "error", message, warnings: [], spectra: [] });
  return readArchive(name, bytes, lim, (file, data) => importOne(file, data, lim), fail);
}

export { importApproachCurves, fileKind, type ImportedCurveFile, type ParsedCurve } from "./approach";

/**
 * Read an uploaded file that may hold spectra, I(z) curves or (as a zip) both: each file or entry
 * goes to the reader its content calls for (fileKind). Entries refused before reading (unsafe
 * names, an archive that cannot be read) are in `spectra`, with their messages.
 */
export function importUpload(name: string, bytes: Uint8Array, limits?: Partial<ImportLimits>): { spectra: ImportedFile[]; curves: ImportedCurveFile[] } {
  const lim = resolveImportLimits(limits);
  const spectra: ImportedFile[] = [];
  const curves: ImportedCurveFile[] = [];
  const one = (file: string, data: Uint8Array) => {
    if (data.length <= lim.maxFileBytes && fileKind(file, data) === "approach") curves.push(...importApproachCurves(file, data, lim));
    else spectra.push(...importSpectra(file, data, lim));
  };
  if (!isZip(bytes) && !/\.zip$/i.test(name)) one(name, bytes);
  else {
    const fail = (file: string, message: string): null => (spectra.push({ file, status: "error", message, warnings: [], spectra: [] }), null);
    readArchive(name, bytes, lim, (file, data) => (one(file, data), null), fail);
  }
  return { spectra, curves };
}
