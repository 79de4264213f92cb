import { describe, expect, it } from "vitest";
import { DEFAULT_EXTRACTION_SETTINGS, resolveExtractionSettings } from "@/lib/spectra";

describe("resolveExtractionSettings", () => {
  it("validates once: its frozen result comes back as it is, anything else is checked again", () => {
    const st = resolveExtractionSettings({ threshold: { k: 4 } });
    expect(st.threshold.k).toBe(4);
    expect(st.smoothing.method).toBe(DEFAULT_EXTRACTION_SETTINGS.smoothing.method);
    expect(Object.isFrozen(st) && Object.isFrozen(st.threshold)).toBe(true);
    expect(resolveExtractionSettings(st)).toBe(st);
    // A copy (a worker thread's, or one with a change) is not taken on trust.
    const copy = structuredClone(st);
    expect(resolveExtractionSettings(copy)).not.toBe(copy);
    expect(() => resolveExtractionSettings({ ...st, threshold: { ...st.threshold, k: -1 } })).toThrow(/above zero/);
    // Frozen: a change in place fails instead of slipping past the check.
    expect(() => {
      (st.threshold as { k: number }).k = -1;
    }).toThrow(TypeError);
  });
});
