/** Display helpers shared by pages and e-mails. Numbers keep their units in the text. */
export function formatGap(gapEv: number | null | undefined, closed?: boolean | null): string {
  if (closed) return "closed";
  if (gapEv == null || !Number.isFinite(gapEv)) return "—";
  return `${(gapEv * 1000).toFixed(0)} meV`;
}

export function formatField(v: number | null | undefined, sigma?: number | null): string {
  if (v == null || !Number.isFinite(v)) return "—";
  return sigma != null && Number.isFinite(sigma) ? `${v.toFixed(2)} ± ${sigma.toFixed(2)} V/nm` : `${v.toFixed(2)} V/nm`;
}


/** A file name's stem from a sample or file name: lower-case letters, digits and single hyphens. */
export function fileStem(name: string, fallback = "bandcross"): string {
  return name.toLowerCase().replace(/[^a-z0-9]+/g, "-").replace(/^-+|-+$/g, "") || fallback;
}

/** A count with its noun in the right number: counted(1, "spectrum", "spectra") → "1 spectrum". */
export function counted(n: number, one: string, many = `${one}s`): string {
  return `${n} ${n === 1 ? one : many}`;
}
