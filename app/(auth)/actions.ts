"use server";

import { AuthError } from "next-auth";
import { redirect } from "next/navigation";
import { z } from "zod";
import { signIn, signOut } from "@/lib/auth";
import { checkRequestHost, untrustedHostMessage } from "@/lib/auth/here";
import type { ActionState } from "@/lib/actions/types";
import { acceptInvitation } from "@/lib/services/members/acceptInvitation";
import { isServiceError } from "@/lib/base/errors";
import { setUpLab } from "@/lib/services/labs/setUpLab";
import { systemContext } from "@/lib/services/system";

const signInInput = z.object({
  email: z.string().trim().toLowerCase().email("Enter your e-mail address."),
  password: z.string().min(1, "Enter your password."),
  next: z.string().optional(),
});

/** Only same-site paths are followed after sign-in. */
function safeNext(next: string | undefined) {
  return next && next.startsWith("/") && !next.startsWith("//") ? next : "/labs";
}

/**
 * Signs in and goes on to `to` on the host the browser came by. Auth.js builds its answer from
 * AUTH_URL when that is set (one fixed origin); following it would carry the browser off to
 * another host name, where the new cookie does not exist. Only its path is followed.
 */
async function signInHere(email: string, password: string, to: string): Promise<never> {
  const landed: unknown = await signIn("credentials", { email, password, redirectTo: to, redirect: false });
  const url = new URL(typeof landed === "string" ? landed : to, "http://same.host");
  redirect(safeNext(url.pathname + url.search));
}

function isRedirect(e: unknown) {
  return Boolean(
    e &&
    typeof e === "object" &&
    "digest" in e &&
    String((e as { digest: unknown }).digest).startsWith("NEXT_REDIRECT"),
  );
}

export async function signInAction(_prev: ActionState, formData: FormData): Promise<ActionState> {
  const parsed = signInInput.safeParse(Object.fromEntries(formData));
  const email = String(formData.get("email") ?? "");
  if (!parsed.success) {
    return { ok: false, message: "Enter your e-mail address and password.", values: { email } };
  }
  const host = await checkRequestHost();
  if (!host.trusted) return { ok: false, message: untrustedHostMessage(host), values: { email } };
  try {
    return await signInHere(parsed.data.email, parsed.data.password, safeNext(parsed.data.next));
  } catch (e) {
    if (isRedirect(e)) throw e;
    if (e instanceof AuthError) {
      const code = (e as AuthError & { code?: string }).code;
      if (code === "throttled") {
        const wait = Math.max(1, Math.ceil((e as { retryAfterSeconds?: number }).retryAfterSeconds ?? 60));
        const when = wait < 90 ? `${wait} second${wait === 1 ? "" : "s"}` : `${Math.ceil(wait / 60)} minutes`;
        return { ok: false, message: `Too many failed attempts. Try again in ${when}.`, values: { email } };
      }
      // Unknown e-mail and wrong password get the same words.
      return { ok: false, message: "That e-mail and password do not match an account.", values: { email } };
    }
    throw e;
  }
}

export async function signOutAction() {
  // Like signing in: stay on the host the browser used.
  await signOut({ redirect: false });
  redirect("/sign-in");
}

export async function acceptInviteAction(token: string, _prev: ActionState, formData: FormData): Promise<ActionState> {
  const input = { token, name: formData.get("name"), password: formData.get("password") };
  let email: string;
  try {
    ({ email } = await acceptInvitation({ ctx: systemContext("invitation link"), input }));
  } catch (e) {
    if (isServiceError(e))
      return {
        ok: false,
        message: e.message,
        fieldErrors: e.fieldErrors,
        values: { name: String(formData.get("name") ?? "") },
      };
    throw e;
  }
  const host = await checkRequestHost();
  if (!host.trusted) return { ok: true, message: `You have joined the lab. ${untrustedHostMessage(host)}` };
  try {
    return await signInHere(email, String(formData.get("password")), "/labs");
  } catch (e) {
    if (isRedirect(e)) throw e;
    // An existing account keeps its own password: send them to sign in with it.
    return { ok: true, message: "You have joined the lab. Sign in with your existing password." };
  }
}

/**
 * `/setup`: the group's first lab and owner (the setup code is the credential); then the new owner
 * is signed in and lands in the lab, or, where sign-in cannot happen here, is sent to sign in.
 */
export async function setUpAction(_prev: ActionState, formData: FormData): Promise<ActionState> {
  const fields = [...formData.entries()].filter(([k, v]) => typeof v === "string" && !k.startsWith("$"));
  const input = Object.fromEntries(fields);
  let slug: string;
  try {
    ({ lab: { slug } } = await setUpLab({ ctx: systemContext("setup"), input }));
  } catch (e) {
    if (!isServiceError(e)) throw e;
    const { password: _typed, ...values } = input as Record<string, string>;
    return { ok: false, message: e.message, fieldErrors: e.fieldErrors, values };
  }
  const host = await checkRequestHost();
  if (!host.trusted) redirect("/sign-in");
  try {
    return await signInHere(String(input.email), String(input.password), `/labs/${slug}`);
  } catch (e) {
    if (isRedirect(e)) throw e;
    redirect(`/sign-in?next=/labs/${slug}`);
  }
}
