/**
 * Reads CSV text as the exports write it (RFC 4180: quoted cells may hold commas, doubled quotes
 * and line breaks) into rows of cells, and each data row into an object keyed by the header.
 */
export function parseCsv(text: string): Record<string, string>[] {
  const rows: string[][] = [];
  let row: string[] = [];
  let cell = "";
  let quoted = false;
  for (let i = 0; i < text.length; i++) {
    const c = text[i];
    if (quoted) {
      if (c === '"' && text[i + 1] === '"') (cell += '"'), i++;
      else if (c === '"') quoted = false;
      else cell += c;
    } else if (c === '"') quoted = true;
    else if (c === ",") row.push(cell), (cell = "");
    else if (c === "\r" && text[i + 1] === "\n") {
      row.push(cell);
      rows.push(row);
      (row = []), (cell = ""), i++;
    } else cell += c;
  }
  if (cell || row.length) rows.push([...row, cell]);
  const [header, ...body] = rows;
  return body.map((r) => Object.fromEntries(header.map((h, j) => [h, r[j] ?? ""])));
}
