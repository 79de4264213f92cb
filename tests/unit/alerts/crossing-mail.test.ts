import { describe, expect, it } from "vitest";
import { devPagesEnabled } from "@/lib/mail/outbox";
import { crossingHeadline, crossingMail, fieldDecimals } from "@/lib/mail/templates/crossing";

const input = {
  kind: "found" as const,
  sampleName: "GX-12 bilayer",
  labName: "Test lab",
  field_V_per_nm: 0.9812,
  ci95_V_per_nm: [0.9504, 1.0121] as [number, number],
  state: "crossed",
  status: "candidate",
  slopes: { below: -1.1, above: 1.09 },
  nSpectra: 20,
  settingsVersion: 1,
  fieldModelVersion: 2,
  assumptions: "E = ΔΦ/(e·d)",
  sampleUrl: "http://localhost:3000/labs/demo/samples/1",
  unsubscribeUrl: "http://localhost:3000/unsubscribe/abc.def",
  at: "2026-11-20T10:15:00.000Z",
};

describe("crossing e-mail wording", () => {
  it("puts the sample and the field with its interval in the subject, as written in the brief's example", () => {
    expect(crossingHeadline(input)).toBe("GX-12 bilayer: gap closes at 0.98 V/nm [0.95, 1.01]");
    expect(crossingHeadline({ ...input, kind: "moved" })).toBe("GX-12 bilayer: critical field moved to 0.98 V/nm [0.95, 1.01]");
    expect(crossingHeadline({ ...input, kind: "confirmed", ci95_V_per_nm: null })).toBe("GX-12 bilayer: critical field confirmed at 0.98 V/nm");
  });

  it("shows enough decimals for the interval's width to have two significant digits, between 2 and 4", () => {
    expect(fieldDecimals([0.95, 1.01])).toBe(2);
    expect(fieldDecimals([0.978, 0.982])).toBe(3);
    expect(fieldDecimals([0.97999, 0.98001])).toBe(4);
    expect(fieldDecimals([0.5, 1.5])).toBe(2);
    expect(fieldDecimals(null)).toBe(2);
  });

  it("escapes names in the HTML and carries the same facts in the text body", () => {
    const m = crossingMail({ ...input, sampleName: "<b>GX</b> & co" });
    expect(m.html).toContain("&lt;b&gt;GX&lt;/b&gt; &amp; co");
    expect(m.html).not.toContain("<b>GX</b>");
    for (const s of ["0.98 V/nm [0.95, 1.01]", "−1.100 eV per V/nm", "+1.090 eV per V/nm", "extraction settings v1, field model v2", input.sampleUrl, input.unsubscribeUrl]) {
      expect(m.text).toContain(s);
      expect(m.html).toContain(s.replace(/&/g, "&amp;"));
    }
  });
});

describe("development pages", () => {
  it("exist outside production, and in production only with BANDCROSS_DEV_PAGES=1", () => {
    expect(devPagesEnabled({ NODE_ENV: "development" })).toBe(true);
    expect(devPagesEnabled({ NODE_ENV: "test" })).toBe(true);
    expect(devPagesEnabled({ NODE_ENV: "production" })).toBe(false);
    expect(devPagesEnabled({ NODE_ENV: "production", BANDCROSS_DEV_PAGES: "0" })).toBe(false);
    expect(devPagesEnabled({ NODE_ENV: "production", BANDCROSS_DEV_PAGES: "1" })).toBe(true);
  });
});
