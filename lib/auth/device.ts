import "server-only";
import { randomBytes } from "node:crypto";
import { env } from "@/lib/env";
import { sha256Hex, signToken, verifyToken } from "./secrets";

/**
 * Device cookies (OWASP, "Slow Down Online Guessing Attacks with Device Cookies"): after a
 * successful sign-in the browser gets a signed cookie naming the account and a random id. Tries
 * that bring it are throttled on that id alone (`throttle.ts`), so a stranger's failures on the
 * account, or from the same address, never slow its owner's own browser. A cookie per account,
 * HMAC-signed with TOKEN_SECRET; it is not a session and opens nothing by itself.
 */
const PURPOSE = "sign-in device";
export const DEVICE_MAX_AGE_S = 365 * 24 * 3600;

const accountTag = (email: string) => sha256Hex(email.trim().toLowerCase()).slice(0, 16);

/** The cookie's name for one account (several people may share a browser). */
export const deviceCookieName = (email: string) => `bandcross-device-${accountTag(email)}`;

export function newDeviceCookie(email: string): string {
  return signToken(env().TOKEN_SECRET, PURPOSE, { a: accountTag(email), d: randomBytes(12).toString("base64url") });
}

/** The device id a cookie value names, if it is genuine and for this account; else null. */
export function deviceOf(value: string, email: string): string | null {
  const payload = verifyToken(env().TOKEN_SECRET, PURPOSE, value);
  return payload && payload.a === accountTag(email) && typeof payload.d === "string" ? payload.d : null;
}

/** A cookie's value from a Cookie header. */
export function cookieFrom(header: string | null | undefined, name: string): string | undefined {
  for (const part of (header ?? "").split(";")) {
    const i = part.indexOf("=");
    if (i > 0 && part.slice(0, i).trim() === name) return decodeURIComponent(part.slice(i + 1).trim());
  }
  return undefined;
}
