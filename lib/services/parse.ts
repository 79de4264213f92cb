import type { z } from "zod";
import { fieldErrorsOf } from "@/lib/schemas/lab";
import { invalid } from "@/lib/base/errors";

/** Validates service input with its schema; a failure is a 422 with field errors. */
export function parseInput<S extends z.ZodType>(schema: S, input: unknown): z.infer<S> {
  const parsed = schema.safeParse(input);
  if (!parsed.success) {
    const fieldErrors = fieldErrorsOf(parsed.error);
    const first = Object.entries(fieldErrors)[0];
    throw invalid(first ? `${first[0]}: ${first[1][0]}` : "The input is not valid.", fieldErrors);
  }
  return parsed.data;
}
