import "server-only";
import { notFound, redirect } from "next/navigation";
import { cache } from "react";
import { auth } from "@/lib/auth";
import { contextForUser } from "@/lib/auth/actor";
import type { Ctx } from "@/lib/base/context";
import { isServiceError, isUnstorableText, unstorableText } from "@/lib/base/errors";
import { getSample } from "@/lib/services/samples/getSample";

import type { ActionState } from "./types";
export type { ActionState };

/** The service context for the signed-in user in a lab; a visitor who is not signed in is sent to sign-in. */
export async function labCtx(labSlug: string): Promise<Ctx> {
  const session = await auth();
  if (!session?.user?.id) redirect("/sign-in");
  return contextForUser(session.user.id, labSlug);
}

/**
 * Server actions are public endpoints: every one resolves the actor from the session (never from
 * the form), runs one service verb, and turns service errors into field errors for the form.
 */
export async function runAction(
  labSlug: string,
  formData: FormData | undefined,
  fn: (ctx: Ctx) => Promise<Partial<ActionState> | void>,
): Promise<ActionState> {
  const values = formData ? Object.fromEntries([...formData.entries()].filter(([k, v]) => typeof v === "string" && !k.startsWith("$")).map(([k, v]) => [k, String(v)])) : undefined;
  try {
    const ctx = await labCtx(labSlug);
    const result = await fn(ctx);
    return { ok: true, ...(result ?? {}) };
  } catch (thrown) {
    const e = isUnstorableText(thrown) ? unstorableText() : thrown;
    if (isServiceError(e)) return { ok: false, message: e.message, fieldErrors: e.fieldErrors, values };
    if (e && typeof e === "object" && "digest" in e && String((e as { digest: unknown }).digest).startsWith("NEXT_REDIRECT")) throw e;
    console.error("[action] unexpected error:", e);
    return { ok: false, message: "Something went wrong on the server; the error was logged.", values };
  }
}

/**
 * For server pages: like labCtx, but a lab the user is not in renders the 404 page. Resolved once
 * per request (React's cache), however many layouts and pages of the request ask for it.
 */
export const pageCtx = cache(async (labSlug: string): Promise<Ctx> => {
  try {
    return await labCtx(labSlug);
  } catch (e) {
    if (isServiceError(e) && e.code === "not_found") notFound();
    throw e;
  }
});

/** For server pages: the sample, or the 404 page; read once per request (the sample's layout checks it, its pages use it). */
export const pageSample = cache(async (labSlug: string, sampleId: string) => orNotFound(getSample({ ctx: await pageCtx(labSlug), input: { id: sampleId } })));

/** Runs a read for a page; a record outside the lab (or absent) renders the 404 page. */
export async function orNotFound<T>(p: Promise<T>): Promise<T> {
  try {
    return await p;
  } catch (e) {
    if (isServiceError(e) && e.code === "not_found") notFound();
    throw e;
  }
}
