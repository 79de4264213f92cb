import { z } from "zod";

/**
 * The start of every text field a form, a server action or an API body sends: PostgreSQL's text
 * types cannot hold the character U+0000 (PostgreSQL manual, "Character Types": "the character with
 * code zero (sometimes called NUL) cannot be stored"), so a NUL reaching an insert failed it with a
 * 500. Refused here instead, as a 422 naming the field. Chain `.trim()`, `.min()`, `.max()` on it as
 * on `z.string()`.
 */
export const NUL_MESSAGE = "Text cannot contain the NUL character (U+0000).";

export const text = (message?: string) =>
  z.string(message ? { error: message } : undefined).refine((s) => !s.includes("\u0000"), NUL_MESSAGE);
