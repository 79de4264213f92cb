import { describe, expect, it } from "vitest";
import { signToken, verifyToken } from "@/lib/auth/secrets";

const SECRET = "a-test-secret-of-reasonable-length";
const ALPHABET = "ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789-_"; // RFC 4648 §5 (base64url)

describe("signed single-purpose tokens", () => {
  const token = signToken(SECRET, "unsubscribe", { u: "user-1", s: "sample-1" });

  it("reads back its payload, and only for its own purpose and secret", () => {
    expect(verifyToken(SECRET, "unsubscribe", token)).toEqual({ u: "user-1", s: "sample-1" });
    expect(verifyToken(SECRET, "invite", token)).toBeNull();
    expect(verifyToken(`${SECRET}x`, "unsubscribe", token)).toBeNull();
  });

  it("refuses a signature spelled differently even when it decodes to the same bytes", () => {
    // A 32-byte HMAC is 43 base64url characters: the last one carries 4 bits of the digest and 2 unused
    // bits (RFC 4648 §3.5, "pad bits"). Flipping an unused bit gives another spelling of the same bytes;
    // a lenient decoder accepts it, so about one tampered link in a thousand would pass.
    const [body, sig] = token.split(".");
    const last = ALPHABET.indexOf(sig.at(-1)!);
    const twin = ALPHABET[last ^ 1];
    expect(Buffer.from(sig.slice(0, -1) + twin, "base64url")).toEqual(Buffer.from(sig, "base64url"));
    expect(verifyToken(SECRET, "unsubscribe", `${body}.${sig.slice(0, -1)}${twin}`)).toBeNull();
  });

  it("refuses every single-character change of the signature", () => {
    const [body, sig] = token.split(".");
    for (let i = 0; i < sig.length; i++) {
      for (const c of ALPHABET) {
        if (c === sig[i]) continue;
        expect(verifyToken(SECRET, "unsubscribe", `${body}.${sig.slice(0, i)}${c}${sig.slice(i + 1)}`)).toBeNull();
      }
    }
  });
});
