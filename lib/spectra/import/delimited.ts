/**
 * Delimited text spectra.
 *
 * Layout: optional metadata lines (`# key: value`, `# key = value`, or the same without `#` before the
 * data), optional header row, then numeric rows. Delimiter: tab, semicolon, comma or whitespace,
 * detected from the first data row; a decimal comma is accepted with tab, semicolon or whitespace
 * delimiters. Header names carry units: `bias (mV)`, `Bias [V]`, `dI/dV (a.u.)`, `current (pA)`.
 * Columns: one bias column and one or more dI/dV columns (each one spectrum), or current columns only
 * (dI/dV = Savitzky–Golay derivative, done by the caller). Lines starting with `#` inside the data are
 * comments. Errors name the line (1-based, as an editor shows it).
 * Read with the axis "z", the same text is an I(z) table: a tip-height column (`z (pm)`, `z [nm]`,
 * `z (Å)`, `height`) and current columns (approach.ts).
 */
import type { ImportLimits, SpectrumMeta } from "./types";
import { ImportError } from "./types";
import { applyMetaPair, emptyMeta, splitMetaLine } from "./metadata";
import { splitNameUnit, unitFactor } from "./units";

export type ColumnRole = "bias" | "didv" | "current" | "z";

/**
 * What a table is read as: spectra (a bias axis, dI/dV or current columns) or I(z) approach curves
 * (a tip-height axis `z`, current columns; see approach.ts).
 */
export type TableAxis = "bias" | "z";

export interface ColumnInfo {
  name: string;
  unit: string;
  role: ColumnRole;
}

export interface DelimitedTable {
  columns: ColumnInfo[];
  /** values[c][r]: column c, data row r; NaN = missing cell. */
  values: Float64Array[];
  /** 1-based source line of each data row. */
  lines: Int32Array;
  meta: SpectrumMeta;
  warnings: string[];
  delimiter: string;
  decimalComma: boolean;
}

const MISSING = new Set(["", "nan", "-nan", "na", "n/a", "null", "none", "-", "--"]);

const DIDV = /(d\s*i\s*\/\s*d\s*v|didv|di_dv|conductance|lock[ -]?in|\blia\b|^g$|^x$|^r$|ldos|signal|^demod)/i;
const CURRENT = /(current|^i$|^it$|^i[ _]|^i\d)/i;
const BIAS = /(bias|voltage|^v$|^u$|^v[ _]?s(ample)?$|^v_?bias|^e$|energy|^sweep)/i;
/** Tip height: `z`, `z position`, `height`, `tip height`, `distance`, `Δz`, `dz`, `z rel`. */
export const Z_AXIS = /^(z|[Δδ]z|dz|delta[ _-]?z|z[ _-]?(pos(ition)?|height|piezo|rel(ative)?|offset|distance|displacement)|(tip[ _-]?)?height|(tip[ _-]?sample[ _-]?)?distance)$/i;

function classify(name: string, axis: TableAxis): ColumnRole | null {
  if (axis === "z") {
    if (Z_AXIS.test(name.trim())) return "z";
    if (CURRENT.test(name)) return "current";
    return null;
  }
  if (DIDV.test(name)) return "didv";
  if (BIAS.test(name)) return "bias";
  if (CURRENT.test(name)) return "current";
  return null;
}

/** Role and words of each axis: the value columns' default role and the axis's quantity. */
const AXES = {
  bias: { value: "didv", valueWords: "dI/dV", axisWords: "a bias", axisName: "bias" },
  z: { value: "current", valueWords: "current", axisWords: "a tip height (z)", axisName: "z" },
} as const;

function detectDelimiter(line: string): { delimiter: string; decimalComma: boolean } {
  if (line.includes("\t")) return { delimiter: "\t", decimalComma: /\d,\d/.test(line) };
  if (line.includes(";")) return { delimiter: ";", decimalComma: /\d,\d/.test(line) };
  const t = line.trim();
  if (t.includes(",")) {
    // "0,5 1,2" (whitespace-separated decimal commas) versus "0.5,1.2" / "1, 2".
    const ws = t.split(/\s+/);
    if (ws.length >= 2 && !t.includes(".") && ws.every((c) => /^[-+]?\d+(,\d+)?([eE][-+]?\d+)?$/.test(c)))
      return { delimiter: " ", decimalComma: true };
    return { delimiter: ",", decimalComma: false };
  }
  return { delimiter: " ", decimalComma: false };
}

function splitLine(line: string, delimiter: string): string[] {
  let cells = delimiter === " " ? line.trim().split(/\s+/) : line.split(delimiter);
  // A trailing delimiter leaves one empty cell.
  if (cells.length > 1 && cells[cells.length - 1].trim() === "") cells = cells.slice(0, -1);
  return cells;
}

/** Number(cell) with decimal comma; NaN for a missing cell; undefined for a non-number. */
function parseCell(cell: string, decimalComma: boolean): number | undefined {
  let c = cell.trim();
  if (c.length > 1 && (c[0] === '"' || c[0] === "'") && c[c.length - 1] === c[0]) c = c.slice(1, -1).trim();
  if (decimalComma) c = c.replace(",", ".");
  if (c === "") return NaN;
  const v = Number(c);
  if (!Number.isNaN(v)) return v;
  const lc = c.toLowerCase();
  if (MISSING.has(lc)) return NaN;
  if (/^[-+]?inf(inity)?$/.test(lc)) return lc[0] === "-" ? -Infinity : Infinity;
  return undefined;
}

function isNumericRow(cells: string[], decimalComma: boolean): boolean {
  let any = false;
  for (const c of cells) {
    const v = parseCell(c, decimalComma);
    if (v === undefined) return false;
    if (!Number.isNaN(v)) any = true;
  }
  return any;
}

const POW10 = [1, 1e1, 1e2, 1e3, 1e4, 1e5, 1e6, 1e7, 1e8, 1e9, 1e10, 1e11, 1e12, 1e13, 1e14, 1e15, 1e16, 1e17, 1e18, 1e19, 1e20, 1e21, 1e22];

/**
 * Fast path for a row of plain numbers separated by a one-character delimiter: parses in place without
 * splitting, exactly (Clinger's fast path: an integer mantissa below 2^53 times or divided by an exact
 * power of ten ≤ 10^22 is correctly rounded). Returns false when any cell needs the general parser
 * (spaces, quotes, missing values, many digits, wrong cell count), and the caller falls back.
 */
function parseRowFast(line: string, delim: number, dec: number, ncol: number, values: Float64Array[], r: number): boolean {
  const len = line.length;
  let i = 0;
  for (let c = 0; c < ncol; c++) {
    if (i >= len) return false;
    let neg = false;
    let ch = line.charCodeAt(i);
    if (ch === 45 || ch === 43) {
      neg = ch === 45;
      i++;
    }
    let mant = 0;
    let digits = 0;
    let frac = 0;
    let any = false;
    while (i < len) {
      ch = line.charCodeAt(i);
      if (ch >= 48 && ch <= 57) {
        if (mant !== 0 || ch !== 48) digits++;
        mant = mant * 10 + (ch - 48);
        any = true;
        i++;
      } else break;
    }
    if (i < len && line.charCodeAt(i) === dec) {
      i++;
      while (i < len) {
        ch = line.charCodeAt(i);
        if (ch >= 48 && ch <= 57) {
          if (mant !== 0 || ch !== 48) digits++;
          mant = mant * 10 + (ch - 48);
          frac++;
          any = true;
          i++;
        } else break;
      }
    }
    if (!any || digits > 15) return false;
    let exp = 0;
    if (i < len && (line.charCodeAt(i) === 101 || line.charCodeAt(i) === 69)) {
      i++;
      let eneg = false;
      ch = line.charCodeAt(i);
      if (ch === 45 || ch === 43) {
        eneg = ch === 45;
        i++;
      }
      let ed = 0;
      while (i < len) {
        ch = line.charCodeAt(i);
        if (ch >= 48 && ch <= 57) {
          exp = exp * 10 + (ch - 48);
          ed++;
          i++;
        } else break;
      }
      if (ed === 0 || ed > 3) return false;
      if (eneg) exp = -exp;
    }
    const e10 = exp - frac;
    let v: number;
    if (e10 === 0) v = mant;
    else if (e10 > 0 && e10 <= 22) v = mant * POW10[e10];
    else if (e10 < 0 && e10 >= -22) v = mant / POW10[-e10];
    else return false;
    values[c][r] = neg ? -v : v;
    if (c < ncol - 1) {
      if (i >= len || line.charCodeAt(i) !== delim) return false;
      i++;
    }
  }
  return i === len;
}

interface Located {
  meta: SpectrumMeta;
  warnings: string[];
  /** 0-based index of the header line (-1: none) and of the first data row (-1: none). */
  headerLine: number;
  first: number;
  fmt: { delimiter: string; decimalComma: boolean };
}

/** Metadata lines, the header and the first data row. */
function locate(lines: string[]): Located {
  const meta = emptyMeta();
  const warnings: string[] = [];
  let headerLine = -1;
  let first = -1;
  let fmt = { delimiter: ",", decimalComma: false };
  for (let i = 0; i < lines.length; i++) {
    const raw = lines[i];
    const t = raw.trim();
    if (t === "") continue;
    if (t[0] === "#" || t[0] === "%") {
      const kv = splitMetaLine(t.replace(/^[#%]+/, ""));
      if (kv) {
        const w = applyMetaPair(meta, kv[0], kv[1]);
        if (w) warnings.push(`line ${i + 1}: ${w}`);
      }
      continue;
    }
    const f = detectDelimiter(t);
    const cells = splitLine(t, f.delimiter);
    if (cells.length >= 2 && isNumericRow(cells, f.decimalComma)) {
      first = i;
      fmt = f;
      break;
    }
    // Not data: a "key: value" line before the data, or the header.
    const kv = splitMetaLine(t);
    if (kv && !/[,;\t]/.test(kv[0])) {
      const w = applyMetaPair(meta, kv[0], kv[1]);
      if (w) warnings.push(`line ${i + 1}: ${w}`);
      continue;
    }
    headerLine = i;
  }
  return { meta, warnings, headerLine, first, fmt };
}

/**
 * What the header of a delimited text names, from its first lines only: a tip-height column (`z`) and
 * a bias or dI/dV column (`spectrum`). Null when the text has no header row before its data.
 */
export function headerRoles(text: string): { z: boolean; spectrum: boolean } | null {
  const lines = text.slice(0, 65536).split(/\r\n|\n|\r/).slice(0, 400);
  const { headerLine, fmt } = locate(lines);
  if (headerLine < 0) return null;
  const delim = fmt.delimiter === " " ? (lines[headerLine].includes("\t") ? "\t" : " ") : fmt.delimiter;
  const names = splitLine(lines[headerLine].trim(), delim).map((h) => splitNameUnit(h.replace(/^["']|["']$/g, "")).name);
  return {
    z: names.some((n) => classify(n, "z") === "z"),
    spectrum: names.some((n) => classify(n, "bias") === "bias" || classify(n, "bias") === "didv"),
  };
}

/** "z" when the header names a tip height and no bias or dI/dV (an I(z) table), else "bias". */
export function tableAxis(text: string): TableAxis {
  const h = headerRoles(text);
  return h && h.z && !h.spectrum ? "z" : "bias";
}

const maxAbs = (a: Float64Array) => a.reduce((m, v) => Math.max(m, Math.abs(v)), 0);

/** Factor of the bias column to V: its unit, or mV for unitless values beyond 20. */
function biasFactor(col: ColumnInfo, values: Float64Array, warnings: string[]): number {
  const f = col.unit ? unitFactor("voltage", col.unit) : 1;
  if (f === null) throw new ImportError(`bias column "${col.name}" has unknown unit "${col.unit}"`);
  if (!col.unit && maxAbs(values) > 20) {
    warnings.push("bias has no unit and exceeds 20: taken as mV");
    return 1e-3;
  }
  return f;
}

/** Factor of the z column to nm: its unit (pm, nm, Å, m …), or for unitless values nm up to 10, pm beyond. */
function zFactor(col: ColumnInfo, values: Float64Array, warnings: string[]): number {
  const f = col.unit ? unitFactor("length", col.unit) : null;
  if (col.unit && f === null) throw new ImportError(`z column "${col.name}" has unknown unit "${col.unit}"`);
  if (f !== null) return f;
  const pm = maxAbs(values) > 10;
  warnings.push(`z has no unit: taken as ${pm ? "pm (its values exceed 10)" : "nm"}`);
  return pm ? 1e-3 : 1;
}

export function parseDelimited(text: string, limits: ImportLimits, axis: TableAxis = "bias"): DelimitedTable {
  const lines = text.split(/\r\n|\n|\r/);
  const { meta, warnings, headerLine, first, fmt } = locate(lines);
  const roles = AXES[axis];
  if (first < 0) {
    if (headerLine >= 0) throw new ImportError(`no numeric data rows after the header on line ${headerLine + 1}`);
    throw new ImportError("no numeric data rows found");
  }
  const firstCells = splitLine(lines[first].trim(), fmt.delimiter);
  const ncol = firstCells.length;
  if (ncol > limits.maxColumns) throw new ImportError(`line ${first + 1}: ${ncol} columns exceed the limit of ${limits.maxColumns}`);
  // Header: names, units and roles.
  let columns: ColumnInfo[];
  if (headerLine >= 0) {
    let hc = splitLine(lines[headerLine].trim(), fmt.delimiter === " " ? (lines[headerLine].includes("\t") ? "\t" : " ") : fmt.delimiter);
    if (fmt.delimiter === " " && hc.length !== ncol) {
      // Whitespace-delimited data under a header whose names contain spaces: try two or more spaces.
      const alt = lines[headerLine].trim().split(/\s{2,}|\t/);
      if (alt.length === ncol) hc = alt;
    }
    if (hc.length !== ncol)
      throw new ImportError(`line ${headerLine + 1}: header has ${hc.length} columns but the data on line ${first + 1} has ${ncol}`);
    columns = hc.map((h) => {
      const { name, unit } = splitNameUnit(h.replace(/^["']|["']$/g, ""));
      return { name, unit, role: (classify(name, axis) ?? roles.value) as ColumnRole };
    });
    const unknown = hc.filter((h) => classify(splitNameUnit(h).name, axis) === null);
    const axisIdx = columns.findIndex((c) => c.role === axis);
    if (axisIdx < 0) {
      columns[0].role = axis;
      warnings.push(`no column named like ${roles.axisWords}; column 1 ("${columns[0].name}") taken as the ${roles.axisName}`);
    } else if (axisIdx !== 0 && columns.filter((c) => c.role === axis).length > 1) {
      warnings.push(`several ${roles.axisName}-like columns; the first is used`);
    }
    const ai = columns.findIndex((c) => c.role === axis);
    columns.forEach((c, i) => {
      if (c.role === axis && i !== ai) c.role = roles.value;
    });
    if (unknown.length > 0 && unknown.length < hc.length)
      warnings.push(`columns without a recognised name taken as ${roles.valueWords}: ${unknown.slice(0, 5).map((u) => `"${u}"`).join(", ")}${unknown.length > 5 ? ` and ${unknown.length - 5} more` : ""}`);
  } else {
    const valueName = (i: number) => (ncol === 2 ? roles.valueWords : `${roles.valueWords} ${i}`);
    columns = firstCells.map((_, i) => ({ name: i === 0 ? roles.axisName : valueName(i), unit: "", role: i === 0 ? axis : roles.value }));
    warnings.push(`no header row; column 1 taken as the ${roles.axisName} and the others as ${roles.valueWords}`);
  }
  // Data rows.
  let nrows = 0;
  for (let i = first; i < lines.length; i++) {
    const t = lines[i].trim();
    if (t !== "" && t[0] !== "#" && t[0] !== "%") nrows++;
  }
  if (nrows > limits.maxPoints) throw new ImportError(`${nrows} data rows exceed the limit of ${limits.maxPoints} points`);
  const values = columns.map(() => new Float64Array(nrows));
  const rowLines = new Int32Array(nrows);
  let r = 0;
  const delimCode = fmt.delimiter === " " ? -1 : fmt.delimiter.charCodeAt(0);
  const decCode = fmt.decimalComma ? 44 : 46;
  for (let i = first; i < lines.length; i++) {
    const t = lines[i].trim();
    if (t === "" || t[0] === "#" || t[0] === "%") continue;
    if (delimCode >= 0 && parseRowFast(t, delimCode, decCode, ncol, values, r)) {
      rowLines[r++] = i + 1;
      continue;
    }
    const cells = splitLine(t, fmt.delimiter);
    if (cells.length !== ncol)
      throw new ImportError(`line ${i + 1}: ragged row with ${cells.length} cells where ${ncol} were expected`);
    for (let c = 0; c < ncol; c++) {
      const v = parseCell(cells[c], fmt.decimalComma);
      if (v === undefined) {
        const shown = cells[c].trim().slice(0, 40);
        throw new ImportError(`line ${i + 1}, column ${c + 1}: "${shown}" is not a number`);
      }
      if (v === Infinity || v === -Infinity) throw new ImportError(`line ${i + 1}, column ${c + 1}: non-finite value "${cells[c].trim()}"`);
      values[c][r] = v;
    }
    rowLines[r++] = i + 1;
  }
  // Units.
  const bi = columns.findIndex((c) => c.role === axis);
  const bcol = columns[bi];
  const bf = axis === "bias" ? biasFactor(bcol, values[bi], warnings) : zFactor(bcol, values[bi], warnings);
  if (bf !== 1) {
    const b = values[bi];
    for (let k = 0; k < b.length; k++) b[k] *= bf;
  }
  columns.forEach((c, ci) => {
    if (c.role !== "current") return;
    let f = c.unit ? unitFactor("current", c.unit) : null;
    if (f === null) {
      let mx = 0;
      for (const v of values[ci]) if (Math.abs(v) > mx) mx = Math.abs(v);
      f = mx < 1e-3 ? 1 : 1e-9;
      warnings.push(`current column "${c.name}" has ${c.unit ? `unknown unit "${c.unit}"` : "no unit"}; taken as ${f === 1 ? "A" : "nA"}`);
    }
    if (f !== 1) for (let k = 0; k < values[ci].length; k++) values[ci][k] *= f;
  });
  return { columns, values, lines: rowLines, meta, warnings, delimiter: fmt.delimiter, decimalComma: fmt.decimalComma };
}
