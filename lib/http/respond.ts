import "server-only";
import { NextResponse } from "next/server";
import { auth } from "@/lib/auth";
import { contextForRequest } from "@/lib/auth/actor";
import type { Ctx } from "@/lib/base/context";
import { badRequest, isServiceError, isUnstorableText, tooLarge, unstorableText } from "@/lib/base/errors";

/** The JSON error body every API route returns: `{ error: { code, message, fields? } }`. */
export function errorResponse(status: number, code: string, message: string, extra?: Record<string, unknown>) {
  return NextResponse.json({ error: { code, message, ...extra } }, { status });
}

/** Maps anything thrown by a handler to a response, once for all routes; unknown errors hide their text. */
export function toErrorResponse(thrown: unknown): NextResponse {
  const e = isUnstorableText(thrown) ? unstorableText() : thrown;
  if (isServiceError(e)) {
    return errorResponse(e.status, e.code, e.message, {
      ...(e.fieldErrors && { fields: e.fieldErrors }),
      ...(e.details && { details: e.details }),
    });
  }
  console.error("[api] unexpected error:", e);
  return errorResponse(500, "internal", "Something went wrong on the server; the error was logged.");
}

/** Reads a JSON body with a size cap; malformed JSON is a 400, an oversized body a 413. */
export async function readJson(request: Request, maxBytes = 1_000_000): Promise<unknown> {
  const declared = Number(request.headers.get("content-length") ?? 0);
  if (declared > maxBytes) throw tooLarge(`The request body is larger than ${maxBytes} bytes.`);
  const text = await request.text();
  if (text.length > maxBytes) throw tooLarge(`The request body is larger than ${maxBytes} bytes.`);
  if (!text.trim()) throw badRequest("The request needs a JSON body.");
  try {
    return JSON.parse(text);
  } catch {
    throw badRequest("The request body is not valid JSON.");
  }
}

type RouteArgs<P> = { params: Promise<P> };

/**
 * A thin API route: resolve the actor (bearer token or browser session), then run `fn` with the
 * service context. Role and lab checks live in the services.
 */
export function apiRoute<P = Record<string, never>>(
  fn: (args: { ctx: Ctx; request: Request; params: P }) => Promise<Response>,
) {
  return async (request: Request, route: RouteArgs<P>) => {
    try {
      const ctx = await contextForRequest(request, async () => (await auth())?.user?.id);
      const params = (await route?.params) ?? ({} as P);
      return await fn({ ctx, request, params });
    } catch (e) {
      return toErrorResponse(e);
    }
  };
}
