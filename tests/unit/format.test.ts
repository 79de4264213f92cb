import { describe, expect, it } from "vitest";
import { fileStem, formatField, formatGap } from "@/lib/format";

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
