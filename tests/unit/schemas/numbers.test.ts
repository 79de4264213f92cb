/**
 * Numbers in the inputs shared by forms, server actions and the HTTP API. The rule pinned here:
 * a value that is not a number (text, `null` where no clearing is meant, a boolean, a blank in a
 * required field) is refused with a message naming the field; it never becomes 0. Before this,
 * `z.coerce.number()` read a script's `null` contact distance as 0 nm and a pick edge of `null`,
 * `""` or `false` as 0 V, stored as if measured.
 */
import { describe, expect, it } from "vitest";
import { sampleInput, sessionInput } from "@/lib/schemas/lab";
import { readNumber } from "@/lib/schemas/number";
import { correctPickInput } from "@/lib/schemas/picks";
import { fieldModelInput, tagPatch } from "@/lib/schemas/uploads";

const messages = (r: { success: boolean; error?: { issues: { path: PropertyKey[]; message: string }[] } }) => (r.success ? [] : r.error!.issues.map((i) => `${i.path.join(".")}: ${i.message}`));

describe("readNumber", () => {
  it("reads numbers and numeric text (a decimal comma as the importer reads files), leaves the rest for the schema to refuse", () => {
    expect(readNumber(4.55)).toBe(4.55);
    expect(readNumber(" 4.55 ")).toBe(4.55);
    expect(readNumber("4,55")).toBe(4.55);
    expect(readNumber("-1e-10")).toBe(-1e-10);
    expect(readNumber("")).toBeUndefined();
    expect(readNumber("   ")).toBeUndefined();
    for (const v of [null, true, false, "abc", "4,5,5", "1 000", [1]]) expect(readNumber(v)).toEqual(v);
  });
});

describe("field model (PUT /samples/{id}/field-model)", () => {
  it("refuses a null, blank, boolean or text contact distance instead of reading it as 0 nm", () => {
    for (const v of [null, "", true, false, "near"]) {
      expect(messages(fieldModelInput.safeParse({ contactDistance_nm: v }))).toEqual(["contactDistance_nm: must be a number (in nm)"]);
    }
  });
  it("keeps the defaults for what is left out, and reads numbers sent as text", () => {
    expect(fieldModelInput.parse({ contactDistance_nm: "0,3" })).toEqual({ contactDistance_nm: 0.3, contactDistanceSigma_nm: 0.05, decayConstantSource: "mean-work-function", assumedBarrierSigma_eV: 1, screening: 1 });
    expect(fieldModelInput.parse({ contactDistance_nm: 0.25, contactDistanceSigma_nm: "", barrierHeight_eV: null }).contactDistanceSigma_nm).toBe(0.05);
  });
  it("still applies the physical bounds", () => {
    expect(messages(fieldModelInput.safeParse({ contactDistance_nm: -0.1 }))).toEqual(["contactDistance_nm: The contact distance cannot be negative."]);
    expect(messages(fieldModelInput.safeParse({ contactDistance_nm: 0.25, assumedBarrierSigma_eV: -1 }))).toEqual(["assumedBarrierSigma_eV: An uncertainty cannot be negative."]);
    expect(messages(fieldModelInput.safeParse({ contactDistance_nm: 0.25, screening: 0.5 }))).toEqual(["screening: A screening factor below 1 would amplify the field."]);
  });
});

describe("pick correction (PATCH /spectra/{id}/pick)", () => {
  const ok = { vbEdge_V: -0.12, cbEdge_V: 0.18, reason: "edge at the step", version: 3 };
  it("refuses edges that are not numbers instead of moving them to 0 V", () => {
    for (const v of [null, "", false, "left"]) {
      expect(messages(correctPickInput.safeParse({ ...ok, vbEdge_V: v }))).toEqual(["vbEdge_V: must be a bias in V"]);
    }
    expect(messages(correctPickInput.safeParse({ ...ok, version: null }))).toEqual(["version: must be the version number the pick was read at"]);
  });
  it("accepts numbers, and numbers as text", () => {
    expect(correctPickInput.parse({ ...ok, cbEdge_V: "0.2", version: "3" })).toEqual({ ...ok, cbEdge_V: 0.2 });
  });
});

describe("tags (PATCH /spectra/tags)", () => {
  it("null clears a value; text that is not a number is refused, not read as a clear", () => {
    expect(tagPatch.parse({ zOffset_pm: null })).toEqual({ zOffset_pm: null });
    expect(messages(tagPatch.safeParse({ setpointCurrent_A: "fifty" }))).toEqual(["setpointCurrent_A: must be a number (in A)"]);
    expect(messages(tagPatch.safeParse({ zOffset_pm: true }))).toEqual(["zOffset_pm: must be a number (in pm)"]);
  });
});

describe("samples and sessions", () => {
  const sample = { name: "GX-7", material: "germanene", workFunction_eV: "4,4", workFunctionSigma_eV: "0.1" };
  it("reads work functions typed with a decimal comma, and refuses a blank one", () => {
    expect(sampleInput.parse(sample).workFunction_eV).toBe(4.4);
    expect(messages(sampleInput.safeParse({ ...sample, workFunction_eV: "" }))).toEqual(["workFunction_eV: Enter a number in eV."]);
    expect(messages(sampleInput.safeParse({ ...sample, workFunction_eV: null }))).toEqual(["workFunction_eV: Enter a number in eV."]);
  });
  it("a blank temperature is no temperature, not 0 K", () => {
    const s = { sampleId: "6f1c1c1e-8d0a-4e8e-9a55-3b6f8f0b2a11", label: "run 1", date: "2026-11-30" };
    expect(sessionInput.parse({ ...s, temperature_K: "" }).temperature_K).toBeUndefined();
    expect(sessionInput.parse({ ...s, temperature_K: "4.5" }).temperature_K).toBe(4.5);
    expect(messages(sessionInput.safeParse({ ...s, temperature_K: "cold" }))).toEqual(["temperature_K: Enter a temperature in kelvin."]);
  });
});
