import { z } from "zod";

/**
 * Reads a number as JSON sends it or as a form's text field does: a number stays itself; text is
 * trimmed, a single decimal comma becomes a point ("4,55" → 4.55, as the importer reads files),
 * and blank text is "no value" (undefined), so an optional field can be left empty. Everything else
 * is handed on unchanged for `schema` to refuse: `null` (unless the schema is nullable), booleans,
 * arrays and text that is not a number. `z.coerce.number()` would read `null`, `""` and `false` as 0
 * and `true` as 1, so a script's `null` contact distance became 0 nm and a typo in a form a zero.
 */
export function readNumber(v: unknown): unknown {
  if (typeof v !== "string") return v;
  const s = v.trim();
  if (s === "") return undefined;
  const n = Number(/^[+-]?\d+,\d+$/.test(s) ? s.replace(",", ".") : s);
  return Number.isNaN(n) ? v : n;
}

/**
 * `schema` (a `z.number()` with its bounds, optional, nullable or defaulted as the field needs)
 * behind `readNumber`. Give the `z.number()` its own message (`{ error: "must be a number" }`): it
 * is what a person reads for text, `null` or a missing value.
 */
export const numberInput = <T extends z.ZodType>(schema: T) => z.preprocess(readNumber, schema);
