import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb } from "@/db/client";
import type { MemberRole } from "@/db/schema";
import { createSample } from "@/lib/services/samples/createSample";
import { createToken } from "@/lib/services/tokens/createToken";
import { APP_URL } from "../support/browser";
import { makeLab, sampleBody, tipBody, type LabFixture } from "../support/fixtures";

/** The HTTP API as scripts meet it: bearer tokens, JSON errors with the right status codes. */
let a: LabFixture;
let b: LabFixture;
const tokens: Partial<Record<`${"a" | "b"}-${MemberRole}`, string>> = {};
let aSampleId: string;

const call = (method: string, path: string, token?: string, body?: unknown) =>
  fetch(`${APP_URL}/api/v1${path}`, {
    method,
    headers: { ...(token ? { authorization: `Bearer ${token}` } : {}), ...(body !== undefined ? { "content-type": "application/json" } : {}) },
    body: body === undefined ? undefined : typeof body === "string" ? body : JSON.stringify(body),
  });

beforeAll(async () => {
  a = await makeLab("API A");
  b = await makeLab("API B");
  for (const role of ["owner", "microscopist", "analyst", "collaborator"] as const) {
    tokens[`a-${role}`] = (await createToken({ ctx: a.ctx("owner"), input: { name: role, userId: a.people[role].id } })).token;
  }
  tokens["b-owner"] = (await createToken({ ctx: b.ctx("owner"), input: { name: "b" } })).token;
  aSampleId = (await createSample({ ctx: a.ctx("owner"), input: sampleBody("A-private") })).id;
});
afterAll(closeDb);

describe("HTTP API v1", () => {
  it("401 without a token, with a JSON error body", async () => {
    const res = await call("GET", "/samples");
    expect(res.status).toBe(401);
    expect(await res.json()).toEqual({ error: { code: "unauthorized", message: expect.any(String) } });
  });

  it("401 for an unknown token", async () => {
    expect((await call("GET", "/samples", "bxt_not-a-real-token")).status).toBe(401);
  });

  it("POST /samples creates a sample with 201 and the API's field names", async () => {
    const res = await call("POST", "/samples", tokens["a-microscopist"], sampleBody("API-made"));
    expect(res.status).toBe(201);
    expect(await res.json()).toMatchObject({ id: expect.any(String), name: "API-made", workFunction_eV: 3.9, workFunctionSigma_eV: 0.1 });
  });

  it("400 for malformed JSON, 422 with field errors for an invalid body, 409 for a duplicate", async () => {
    expect((await call("POST", "/samples", tokens["a-owner"], "{not json")).status).toBe(400);
    const bad = await call("POST", "/samples", tokens["a-owner"], { name: "", workFunction_eV: "lots" });
    expect(bad.status).toBe(422);
    const body = (await bad.json()) as { error: { code: string; fields: Record<string, string[]> } };
    expect(body.error.code).toBe("invalid");
    expect(Object.keys(body.error.fields)).toEqual(expect.arrayContaining(["name", "material", "workFunction_eV"]));
    expect((await call("POST", "/samples", tokens["a-owner"], sampleBody("A-private"))).status).toBe(409);
  });

  it("a null where a number belongs is a 422 naming the field, never a zero: the field model keeps its version", async () => {
    const t = tokens["a-analyst"];
    const before = (await (await call("GET", `/samples/${aSampleId}/field-model`, t)).json()) as { version: number };
    const res = await call("PUT", `/samples/${aSampleId}/field-model`, t, { contactDistance_nm: null });
    expect(res.status).toBe(422);
    expect(((await res.json()) as { error: { fields: Record<string, string[]> } }).error.fields).toEqual({ contactDistance_nm: ["must be a number (in nm)"] });
    expect(((await (await call("GET", `/samples/${aSampleId}/field-model`, t)).json()) as { version: number }).version).toBe(before.version);
  });

  it("a collaborator's token reads but every write is refused with 403", async () => {
    const t = tokens["a-collaborator"];
    expect((await call("GET", "/samples", t)).status).toBe(200);
    expect((await call("POST", "/samples", t, sampleBody())).status).toBe(403);
    expect((await call("PATCH", `/samples/${aSampleId}`, t, { notes: "x" })).status).toBe(403);
    expect((await call("POST", "/tips", t, tipBody())).status).toBe(403);
    expect((await call("POST", "/sessions", t, { sampleId: aSampleId, label: "x", date: "2026-11-01" })).status).toBe(403);
  });

  it("an analyst may create samples but not tips or sessions", async () => {
    expect((await call("POST", "/samples", tokens["a-analyst"], sampleBody())).status).toBe(201);
    expect((await call("POST", "/tips", tokens["a-analyst"], tipBody())).status).toBe(403);
  });

  it("lab B's token never sees lab A's records", async () => {
    const t = tokens["b-owner"];
    expect((await call("GET", `/samples/${aSampleId}`, t)).status).toBe(404);
    expect((await call("PATCH", `/samples/${aSampleId}`, t, { notes: "x" })).status).toBe(404);
    expect((await call("POST", "/sessions", t, { sampleId: aSampleId, label: "x", date: "2026-11-01" })).status).toBe(404);
    const list = (await (await call("GET", "/samples", t)).json()) as { samples: { id: string }[] };
    expect(list.samples.map((s) => s.id)).not.toContain(aSampleId);
  });

  it("a microscopist creates a tip and a session on it", async () => {
    const tip = await call("POST", "/tips", tokens["a-microscopist"], tipBody());
    expect(tip.status).toBe(201);
    const { id: tipId } = (await tip.json()) as { id: string };
    const s = await call("POST", "/sessions", tokens["a-microscopist"], { sampleId: aSampleId, tipId, date: "2026-11-20", temperature_K: 4.6, label: "approach A" });
    expect(s.status).toBe(201);
    expect(await s.json()).toMatchObject({ sampleId: aSampleId, tipId, temperature_K: 4.6 });
  });

  it("every write of the pipeline and the review refuses a collaborator's token (403) and lab B's token (404)", async () => {
    const sessionRes = await call("POST", "/sessions", tokens["a-microscopist"], { sampleId: aSampleId, date: "2026-11-20", label: "tokens" });
    const { id: sessionId } = (await sessionRes.json()) as { id: string };
    const file = { name: "x.csv", size: 100, sha256: "d".repeat(64) };
    const upload = await call("POST", "/uploads", tokens["a-microscopist"], { sessionId, files: [file] });
    expect(upload.status).toBe(201);
    const { uploads } = (await upload.json()) as { uploads: { id: string; url: string; method: string }[] };
    expect(uploads[0]).toMatchObject({ method: "PUT", url: expect.stringContaining("X-Amz-Signature") });
    const uploadId = uploads[0].id;
    const nobody = "00000000-0000-4000-8000-000000000000";
    const writes: [string, string, unknown][] = [
      ["POST", "/uploads", { sessionId, files: [{ ...file, sha256: "e".repeat(64) }] }],
      ["POST", `/uploads/${uploadId}/complete`, undefined],
      ["POST", `/uploads/${uploadId}/retry`, undefined],
      ["PATCH", "/spectra/tags", { ids: [nobody], patch: { region: "x" } }],
      ["PUT", `/samples/${aSampleId}/field-model`, { contactDistance_nm: 0.3 }],
      ["PUT", `/samples/${aSampleId}/extraction-settings`, { settings: {} }],
      ["PATCH", `/spectra/${nobody}/pick`, { vbEdge_V: -0.1, cbEdge_V: 0.1, reason: "not allowed", version: 1 }],
      ["PUT", `/spectra/${nobody}/exclusion`, { excluded: true, reason: "not allowed", version: 1 }],
      ["POST", `/samples/${aSampleId}/crossing/confirm`, {}],
    ];
    for (const [method, path, body] of writes) {
      const asCollaborator = await call(method, path, tokens["a-collaborator"], body);
      expect([403], `${method} ${path} as collaborator`).toContain(asCollaborator.status);
    }
    const reads = [`/uploads/${uploadId}`, `/samples/${aSampleId}/phase`, `/sessions/${sessionId}/spectra`, `/samples/${aSampleId}/export?format=json`];
    for (const path of [...reads]) expect((await call("GET", path, tokens["b-owner"])).status, `GET ${path} as lab B`).toBe(404);
    for (const [method, path, body] of writes.filter(([, p]) => !p.includes(nobody))) {
      const asOtherLab = await call(method, path, tokens["b-owner"], body);
      expect([404], `${method} ${path} as lab B`).toContain(asOtherLab.status);
    }
  });

  it("a file above the size limit gets 413 with a clear message", async () => {
    const sessionRes = await call("POST", "/sessions", tokens["a-microscopist"], { sampleId: aSampleId, date: "2026-11-20", label: "big" });
    const { id: sessionId } = (await sessionRes.json()) as { id: string };
    const res = await call("POST", "/uploads", tokens["a-microscopist"], { sessionId, files: [{ name: "huge-grid.csv", size: 5e9, sha256: "f".repeat(64) }] });
    expect(res.status).toBe(413);
    expect(((await res.json()) as { error: { message: string } }).error.message).toContain("huge-grid.csv");
  });

  it("the phase endpoint answers 304 to a client that already has the current version (RFC 9110 If-None-Match)", async () => {
    const first = await call("GET", `/samples/${aSampleId}/phase`, tokens["a-analyst"]);
    expect(first.status).toBe(200);
    const etag = first.headers.get("etag")!;
    expect(etag).toMatch(/^W\/".+"$/);
    const again = await fetch(`${APP_URL}/api/v1/samples/${aSampleId}/phase`, { headers: { authorization: `Bearer ${tokens["a-analyst"]}`, "if-none-match": etag } });
    expect(again.status).toBe(304);
    // Another lab's token learns nothing, not even "not modified".
    const other = await fetch(`${APP_URL}/api/v1/samples/${aSampleId}/phase`, { headers: { authorization: `Bearer ${tokens["b-owner"]}`, "if-none-match": etag } });
    expect(other.status).toBe(404);
  });
});

