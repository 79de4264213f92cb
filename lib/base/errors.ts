/**
 * The one error taxonomy of the services. Route handlers and server actions map these to status
 * codes in exactly one place (`lib/http/respond.ts`, `lib/actions/validated.ts`); any other error
 * is reported as an internal error without its text.
 */
export type ErrorCode =
  | "bad_request"
  | "unauthorized"
  | "forbidden"
  | "not_found"
  | "conflict"
  | "too_large"
  | "invalid"
  | "rate_limited";

const STATUS: Record<ErrorCode, number> = {
  bad_request: 400,
  unauthorized: 401,
  forbidden: 403,
  not_found: 404,
  conflict: 409,
  too_large: 413,
  invalid: 422,
  rate_limited: 429,
};

export class ServiceError extends Error {
  readonly code: ErrorCode;
  readonly status: number;
  readonly fieldErrors?: Record<string, string[]>;
  readonly details?: Record<string, unknown>;

  constructor(code: ErrorCode, message: string, extra?: { fieldErrors?: Record<string, string[]>; details?: Record<string, unknown> }) {
    super(message);
    this.name = "ServiceError";
    this.code = code;
    this.status = STATUS[code];
    this.fieldErrors = extra?.fieldErrors;
    this.details = extra?.details;
  }
}

export const badRequest = (message: string) => new ServiceError("bad_request", message);
export const unauthorized = (message = "Sign in or send an API token.") => new ServiceError("unauthorized", message);
export const forbidden = (message = "Your role in this lab does not allow that.") => new ServiceError("forbidden", message);
export const notFound = (what = "record") => new ServiceError("not_found", `No such ${what} in this lab.`);
export const conflict = (message: string, details?: Record<string, unknown>) => new ServiceError("conflict", message, { details });
export const tooLarge = (message: string) => new ServiceError("too_large", message);
export const invalid = (message: string, fieldErrors?: Record<string, string[]>) => new ServiceError("invalid", message, { fieldErrors });
export const rateLimited = (message: string) => new ServiceError("rate_limited", message);

export function isServiceError(e: unknown): e is ServiceError {
  return e instanceof ServiceError;
}

/** Whether a PostgreSQL error with one of `codes` (SQLSTATE) is `e` or its cause (drizzle wraps them). */
function hasSqlState(e: unknown, codes: string[]): boolean {
  let cur: unknown = e;
  for (let i = 0; i < 4 && cur; i++) {
    if (typeof cur === "object" && cur !== null && codes.includes((cur as { code?: string }).code ?? "")) return true;
    cur = (cur as { cause?: unknown }).cause;
  }
  return false;
}

/** PostgreSQL unique violation (SQLSTATE 23505), seen through drizzle's wrapped errors too. */
export const isUniqueViolation = (e: unknown) => hasSqlState(e, ["23505"]);

/**
 * Text PostgreSQL cannot store: a NUL character in text (22021, character_not_in_repertoire) or in
 * jsonb (22P05, untranslatable_character). The shared text schema (`lib/schemas/text.ts`) refuses
 * it with the field's name first; this catches a field that does not go through it.
 */
export const isUnstorableText = (e: unknown) => hasSqlState(e, ["22021", "22P05"]);

export const unstorableText = () => badRequest("Text cannot contain the NUL character (U+0000).");
