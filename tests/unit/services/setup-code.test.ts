import { describe, expect, it } from "vitest";
import { newSetupCode, setupCodeHash } from "@/lib/services/labs/shared";

/**
 * The setup code of the start log: read off a terminal and typed, so without characters that are
 * misread for one another (I/1, O/0: common practice for codes typed by hand), and long enough that
 * guessing is hopeless with no throttle: NIST SP 800-63B asks at least 20 bits of a look-up secret
 * behind a throttle (from memory); 16 characters of 32 kinds are 80 bits.
 */
describe("setup codes", () => {
  it("are four groups of four from 32 unambiguous characters", () => {
    const seen = new Set<string>();
    for (let i = 0; i < 2000; i++) {
      const code = newSetupCode();
      expect(code).toMatch(/^[A-HJ-NP-Z2-9]{4}(-[A-HJ-NP-Z2-9]{4}){3}$/);
      for (const ch of code.replace(/-/g, "")) seen.add(ch);
    }
    expect(seen.size).toBe(32); // every one of the 32 is used: 5 bits a character, 80 in all
    expect([...seen].some((c) => "IO01".includes(c))).toBe(false);
  });

  it("never repeat over many draws", () => {
    const codes = new Set(Array.from({ length: 10_000 }, newSetupCode));
    expect(codes.size).toBe(10_000);
  });

  it("are stored as SHA-256 hex, the same however they are typed", () => {
    const h = setupCodeHash("ABCD-EFGH-JKLM-NPQR");
    expect(h).toMatch(/^[0-9a-f]{64}$/);
    expect(setupCodeHash(" abcd efgh jklm npqr ")).toBe(h);
    expect(setupCodeHash("ABCDEFGHJKLMNPQR")).toBe(h);
    expect(setupCodeHash("ABCD-EFGH-JKLM-NPQS")).not.toBe(h);
  });
});
