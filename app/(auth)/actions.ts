"use server";

import { AuthError } from "next-auth";
import { z } from "zod";
import { db } from "@/db/client";
import { signIn, signOut } from "@/lib/auth";
import type { ActionState } from "@/lib/actions/types";
import { acceptInvitation } from "@/lib/services/members/members";
import { isServiceError } from "@/lib/services/errors";

const signInInput = z.object({
  email: z.string().trim().toLowerCase().email("Enter your e-mail address."),
  password: z.string().min(1, "Enter your password."),
  next: z.string().optional(),
});

/** Only same-site paths are followed after sign-in. */
function safeNext(next: string | undefined) {
  return next && next.startsWith("/") && !next.startsWith("//") ? next : "/labs";
}

function isRedirect(e: unknown) {
  return Boolean(e && typeof e === "object" && "digest" in e && String((e as { digest: unknown }).digest).startsWith("NEXT_REDIRECT"));
}

export async function signInAction(_prev: ActionState, formData: FormData): Promise<ActionState> {
  const parsed = signInInput.safeParse(Object.fromEntries(formData));
  const email = String(formData.get("email") ?? "");
  if (!parsed.success) {
    return { ok: false, message: "Enter your e-mail address and password.", values: { email } };
  }
  try {
    await signIn("credentials", { email: parsed.data.email, password: parsed.data.password, redirectTo: safeNext(parsed.data.next) });
    return { ok: true };
  } catch (e) {
    if (isRedirect(e)) throw e;
    if (e instanceof AuthError) {
      const code = (e as AuthError & { code?: string }).code;
      if (code === "throttled") {
        return { ok: false, message: "Too many failed attempts. Wait 15 minutes, or ask your lab owner to check your account.", values: { email } };
      }
      // Unknown e-mail and wrong password get the same words.
      return { ok: false, message: "That e-mail and password do not match an account.", values: { email } };
    }
    throw e;
  }
}

export async function signOutAction() {
  await signOut({ redirectTo: "/sign-in" });
}

export async function acceptInviteAction(token: string, _prev: ActionState, formData: FormData): Promise<ActionState> {
  const input = { token, name: formData.get("name"), password: formData.get("password") };
  let email: string;
  try {
    ({ email } = await acceptInvitation({ db: db(), input }));
  } catch (e) {
    if (isServiceError(e)) return { ok: false, message: e.message, fieldErrors: e.fieldErrors, values: { name: String(formData.get("name") ?? "") } };
    throw e;
  }
  try {
    await signIn("credentials", { email, password: String(formData.get("password")), redirectTo: "/labs" });
  } catch (e) {
    if (isRedirect(e)) throw e;
    // An existing account keeps its own password: send them to sign in with it.
    return { ok: true, message: "You have joined the lab. Sign in with your existing password." };
  }
  return { ok: true };
}
