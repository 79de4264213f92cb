/** Unit names found in headers and metadata, and their factors to the canonical units. */

const norm = (u: string) =>
  u
    .trim()
    .toLowerCase()
    .replace(/µ|μ/g, "u")
    .replace(/[\s.]/g, "")
    .replace(/^°/, "");

const VOLT: Record<string, number> = { v: 1, mv: 1e-3, uv: 1e-6, kv: 1e3, ev: 1, mev: 1e-3 };
const AMPERE: Record<string, number> = { a: 1, ma: 1e-3, ua: 1e-6, na: 1e-9, pa: 1e-12, fa: 1e-15 };
const NANOMETRE: Record<string, number> = { nm: 1, pm: 1e-3, a: 0.1, å: 0.1, ang: 0.1, angstrom: 0.1, m: 1e9, um: 1e3, mm: 1e6 };

export type Quantity = "voltage" | "current" | "length" | "temperature";

/** Factor from `unit` to V / A / nm; null if the unit is unknown for that quantity. */
export function unitFactor(quantity: Exclude<Quantity, "temperature">, unit: string): number | null {
  const u = norm(unit).replace(/(rms|pp|peak|p-p)$/, "");
  const table = quantity === "voltage" ? VOLT : quantity === "current" ? AMPERE : NANOMETRE;
  return u in table ? table[u] : null;
}

/** Temperature in K from a value and a unit (K, mK, C/°C); null if the unit is unknown. */
export function toKelvin(value: number, unit: string): number | null {
  const u = norm(unit);
  if (u === "" || u === "k") return value;
  if (u === "mk") return value * 1e-3;
  if (u === "c" || u === "degc" || u === "celsius") return value + 273.15;
  return null;
}

/** Split "name (unit)", "name [unit]" or "name / unit" into its parts. */
export function splitNameUnit(raw: string): { name: string; unit: string } {
  const s = raw.trim();
  let m = /^(.*?)[\s_]*[([]\s*([^()[\]]*?)\s*[)\]]\s*$/.exec(s);
  if (m) return { name: m[1].trim(), unit: m[2] };
  m = /^(.*?)\s+\/\s+(\S+)$/.exec(s);
  if (m) return { name: m[1].trim(), unit: m[2] };
  return { name: s, unit: "" };
}

/** Parse "12.5", "12,5", "1e-10", "50 pA", "4.5K"; decimal comma accepted. */
export function parseValueWithUnit(raw: string): { value: number; unit: string } | null {
  const m = /^\s*([-+]?(?:\d+(?:[.,]\d*)?|[.,]\d+)(?:[eE][-+]?\d+)?)\s*(.*?)\s*$/.exec(raw);
  if (!m) return null;
  const value = Number(m[1].replace(",", "."));
  return Number.isFinite(value) ? { value, unit: m[2] } : null;
}
