import { describe, expect, it } from "vitest";
import { deltaBicInWords, fileStem, formatField, formatGap, formatMv, formatUtc, pickMethodInWords } from "@/lib/format";

describe("fileStem", () => {
  it("keeps letters and digits, lower-cased, joined by single hyphens", () => {
    expect(fileStem("GX-12 bilayer phase")).toBe("gx-12-bilayer-phase");
    expect(fileStem("  Ø/ 2026_11_30 session #4.dat ")).toBe("2026-11-30-session-4-dat");
  });

  it("never yields an empty name, a path or a hidden file", () => {
    expect(fileStem("../../etc/passwd")).toBe("etc-passwd");
    expect(fileStem(".hidden")).toBe("hidden");
    expect(fileStem("αβγ")).toBe("bandcross");
    expect(fileStem("", "figure")).toBe("figure");
  });
});

describe("formatGap and formatField", () => {
  it("show meV and V/nm with their units, a dash for no value", () => {
    expect(formatGap(0.2714)).toBe("271 meV");
    expect(formatGap(null)).toBe("—");
    expect(formatGap(0.01, true)).toBe("closed");
    expect(formatField(1.234, 0.056)).toBe("1.23 ± 0.06 V/nm");
    expect(formatField(Number.NaN)).toBe("—");
  });
});

describe("deltaBicInWords", () => {
  // Cases from the critical-field card's bugs ("= > 100", a bare "−32601.7"); grades after Kass & Raftery (1995), from memory.
  it("gives the number with its sign and what it means", () => {
    expect(deltaBicInWords(132.4)).toBe("ΔBIC = 132: strong preference for closing and reopening");
    expect(deltaBicInWords(-32601.7)).toBe("ΔBIC = −32,602: strong preference for a straight line (no closing and reopening)");
    expect(deltaBicInWords(3.25)).toBe("ΔBIC = 3.3: some preference for closing and reopening");
    expect(deltaBicInWords(-0.4)).toBe("ΔBIC = −0.4: no clear preference for either model");
  });
});

describe("pickMethodInWords", () => {
  it("names the picker's methods in words", () => {
    expect(pickMethodInWords("fit-separate")).toBe("each edge fitted");
    expect(pickMethodInWords("fit-joint")).toBe("both edges fitted together");
    expect(pickMethodInWords("some-new-method")).toBe("some new method");
  });
});

describe("formatUtc", () => {
  it("writes a moment to the minute in UTC, whatever the process's time zone", () => {
    const before = process.env.TZ;
    try {
      // A zone nine hours ahead: a local formatter would write 2026-12-05 05:04.
      process.env.TZ = "Asia/Tokyo";
      expect(formatUtc(new Date("2026-12-04T20:04:59.900Z"))).toBe("2026-12-04 20:04 UTC");
      expect(formatUtc("2026-01-31T23:59:00Z")).toBe("2026-01-31 23:59 UTC");
    } finally {
      if (before === undefined) delete process.env.TZ;
      else process.env.TZ = before;
    }
  });
});

describe("formatMv", () => {
  it("gives a bias in V as mV with one decimal, or a dash when there is none", () => {
    expect(formatMv(-0.0423)).toBe("-42.3 mV");
    expect(formatMv(0.1)).toBe("100.0 mV");
    expect(formatMv(null)).toBe("—");
    expect(formatMv(undefined)).toBe("—");
  });
});
