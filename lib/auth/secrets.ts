import { createHash, createHmac, randomBytes, timingSafeEqual } from "node:crypto";

/** SHA-256 hex of a secret; what the database stores for API tokens and invitation links. */
export function sha256Hex(value: string | Uint8Array): string {
  return createHash("sha256").update(value).digest("hex");
}

/** A URL-safe random secret with a readable prefix, e.g. `bxt_…` for API tokens. */
export function newSecret(prefix: string, bytes = 32): string {
  return `${prefix}_${randomBytes(bytes).toString("base64url")}`;
}

/**
 * A signed, single-purpose token (e.g. an unsubscribe link that works without signing in):
 * `payload.signature`, HMAC-SHA-256 over purpose and payload with TOKEN_SECRET.
 *
 * Kept as HMAC by hand rather than a JWS library (jose): these links sit in e-mails already sent
 * and never expire, so their format cannot change without breaking them; one fixed algorithm and
 * one fixed purpose need no header or algorithm choice (where JWS mistakes happen), and the
 * comparison is constant-time (timingSafeEqual). A format with expiry or rotation would be jose.
 */
export function signToken(secret: string, purpose: string, payload: Record<string, string>): string {
  const body = Buffer.from(JSON.stringify(payload)).toString("base64url");
  const sig = createHmac("sha256", secret).update(`${purpose}.${body}`).digest("base64url");
  return `${body}.${sig}`;
}

export function verifyToken(secret: string, purpose: string, token: string): Record<string, string> | null {
  const [body, sig] = token.split(".");
  if (!body || !sig) return null;
  // Compared as text, not as decoded bytes: base64url decoding ignores the last character's unused bits,
  // so another spelling of the same signature would pass (RFC 4648 §3.5).
  const expected = Buffer.from(createHmac("sha256", secret).update(`${purpose}.${body}`).digest("base64url"));
  const given = Buffer.from(sig);
  if (given.length !== expected.length || !timingSafeEqual(given, expected)) return null;
  try {
    return JSON.parse(Buffer.from(body, "base64url").toString("utf8"));
  } catch {
    return null;
  }
}
