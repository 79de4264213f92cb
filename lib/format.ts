/** Display helpers shared by pages and e-mails. Numbers keep their units in the text. */
import { UTCDate } from "@date-fns/utc";
import { format } from "date-fns";

/**
 * A moment to the minute in UTC, "2026-12-04 20:04 UTC": the one way pages, messages and e-mails
 * write a time (the same text on the server and in every browser, whatever their time zone).
 */
export function formatUtc(at: Date | string): string {
  return `${format(new UTCDate(typeof at === "string" ? at : at.getTime()), "yyyy-MM-dd HH:mm")} UTC`;
}
export function formatGap(gapEv: number | null | undefined, closed?: boolean | null): string {
  if (closed) return "closed";
  if (gapEv == null || !Number.isFinite(gapEv)) return "—";
  return `${(gapEv * 1000).toFixed(0)} meV`;
}

export function formatField(v: number | null | undefined, sigma?: number | null): string {
  if (v == null || !Number.isFinite(v)) return "—";
  return sigma != null && Number.isFinite(sigma) ? `${v.toFixed(2)} ± ${sigma.toFixed(2)} V/nm` : `${v.toFixed(2)} V/nm`;
}

/** A bias in V as mV with one decimal (band edges on the review page), or "—". */
export const formatMv = (v: number | null | undefined): string => (v == null ? "—" : `${(v * 1000).toFixed(1)} mV`);

/** A file name's stem from a sample or file name: lower-case letters, digits and single hyphens. */
export function fileStem(name: string, fallback = "bandcross"): string {
  return name.toLowerCase().replace(/[^a-z0-9]+/g, "-").replace(/^-+|-+$/g, "") || fallback;
}

/** A count with its noun in the right number: counted(1, "spectrum", "spectra") → "1 spectrum". */
export function counted(n: number, one: string, many = `${one}s`): string {
  return `${n} ${n === 1 ? one : many}`;
}

/**
 * The model comparison of a critical-field fit in words. ΔBIC is the straight line's BIC minus the
 * V-shape's (lib/spectra/crossing.ts), so a positive value favours closing and reopening. Grades
 * after Kass & Raftery (1995): below 2 no clear preference, from 2 some, from 6 strong (from
 * memory). Large values are rounded and grouped; the sign is a true minus.
 */
export function deltaBicInWords(deltaBic: number): string {
  const a = Math.abs(deltaBic);
  const value = `${deltaBic < 0 ? "−" : ""}${a >= 100 ? Math.round(a).toLocaleString("en-GB") : a.toFixed(1)}`;
  const grade = a >= 6 ? "strong" : a >= 2 ? "some" : null;
  if (!grade) return `ΔBIC = ${value}: no clear preference for either model`;
  return `ΔBIC = ${value}: ${grade} preference for ${deltaBic > 0 ? "closing and reopening" : "a straight line (no closing and reopening)"}`;
}

/** How an automatic pick found its edges, in words (the picker's method names are internal). */
const PICK_METHOD: Record<string, string> = {
  "fit-separate": "each edge fitted",
  "fit-joint": "both edges fitted together",
  threshold: "threshold crossing",
  manual: "set by hand",
  none: "no edges",
};
export const pickMethodInWords = (method: string | null | undefined): string => (method ? (PICK_METHOD[method] ?? method.replace(/-/g, " ")) : "—");

/** A spectrum's place in its file: `#3`; an average (stored at a negative index) is named so. */
export function spectrumIndex(index: number): string {
  return index < 0 ? "average" : `#${index}`;
}
