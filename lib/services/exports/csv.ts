/**
 * CSV writing for exports (RFC 4180 quoting). Text cells that a spreadsheet would read as a
 * formula — starting with =, +, -, @, a tab or a carriage return — get a leading apostrophe
 * (the usual neutralisation against formula injection); numbers are written as numbers.
 */
export type Cell = string | number | boolean | null | undefined;

export function neutralise(text: string): string {
  return /^[=+\-@\t\r]/.test(text) ? `'${text}` : text;
}

export function csvCell(v: Cell): string {
  if (v === null || v === undefined) return "";
  if (typeof v === "number") return Number.isFinite(v) ? String(v) : "";
  if (typeof v === "boolean") return v ? "true" : "false";
  const t = neutralise(v);
  return /[",\n\r]/.test(t) ? `"${t.replace(/"/g, '""')}"` : t;
}

export function csv(header: string[], rows: Cell[][]): string {
  return [header.map(csvCell).join(","), ...rows.map((r) => r.map(csvCell).join(","))].join("\r\n") + "\r\n";
}
