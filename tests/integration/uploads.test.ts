import fs from "node:fs";
import { PutObjectCommand, S3Client } from "@aws-sdk/client-s3";
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, db } from "@/db/client";
import { spectra, uploads } from "@/db/schema";
import { env } from "@/lib/env";
import { stopBoss } from "@/lib/jobs/queue";
import { createSample } from "@/lib/services/samples/createSample";
import { createSession } from "@/lib/services/sessions/createSession";
import { completeUpload } from "@/lib/services/uploads/completeUpload";
import { createUploads } from "@/lib/services/uploads/createUploads";
import { processUpload } from "@/lib/services/uploads/processUpload";
import { makeSweep, spectrumToCsv } from "@/lib/spectra";
import { getObjectBytes, objectSize, presignPut } from "@/lib/storage/s3";
import { makeLab, rejection, system, type LabFixture } from "../support/fixtures";
import { bytesOf, sha256 } from "../support/pipeline";

/**
 * The raw file's way into storage, against the real PostgreSQL and the storage fake: the bytes a
 * spectrum came from never change, a transfer that went wrong leaves nothing behind and blocks
 * nothing, and the genuine file can always be sent. Checks against SHA-256 (FIPS 180-4, computed
 * with node:crypto) and the presigned-URL rules of S3's query-string authentication (AWS Signature
 * Version 4: a URL stays usable by anyone holding it until X-Amz-Expires has passed).
 */
let lab: LabFixture;
let sessionId: string;
const sweep = makeSweep({ n: 12, seed: 403, step_V: 0.01 });
const fileBytes = (i: number) => bytesOf(spectrumToCsv(sweep.spectra[i]));
/** The same length as `b`, other content: only a hash tells them apart. */
const sameLengthOtherBytes = (b: Uint8Array) => b.map((x, i) => (i === b.length - 2 ? (x === 0x30 ? 0x31 : 0x30) : x));

async function register(name: string, size: number, sha: string) {
  const { uploads: [t] } = await createUploads({ ctx: lab.ctx("microscopist"), input: { sessionId, files: [{ name, size, sha256: sha }] } });
  return t;
}

async function put(url: string, headers: Record<string, string>, body: Uint8Array) {
  const res = await fetch(url, { method: "PUT", headers, body: Buffer.from(body) });
  if (!res.ok) throw new Error(`presigned PUT answered ${res.status}: ${await res.text()}`);
}

/** Registers, sends and completes a file: the upload's row afterwards. */
async function sendFile(name: string, bytes: Uint8Array) {
  const t = await register(name, bytes.length, sha256(bytes));
  await put(t.url!, t.headers, bytes);
  await completeUpload({ ctx: lab.ctx("microscopist"), input: { id: t.id } });
  return { t, row: await rowOf(t.id) };
}

const rowOf = async (id: string) => (await db().select().from(uploads).where(eq(uploads.id, id)))[0];

beforeAll(async () => {
  lab = await makeLab("Uploads");
  const owner = lab.ctx("owner");
  const sampleId = (await createSample({ ctx: owner, input: { name: "Raw bytes", material: "germanene", workFunction_eV: 3.9, workFunctionSigma_eV: 0.1 } })).id;
  sessionId = (await createSession({ ctx: owner, input: { sampleId, label: "raw", date: "2026-12-01", temperature_K: 4.5 } })).id;
});

afterAll(async () => {
  await stopBoss();
  await closeDb();
});

describe("raw files are immutable", () => {
  it("a finished upload's still-valid presigned URL cannot change the bytes its spectra came from", async () => {
    const bytes = fileBytes(0);
    const t = await register("kept.csv", bytes.length, sha256(bytes));
    await put(t.url!, t.headers, bytes);
    await completeUpload({ ctx: lab.ctx("microscopist"), input: { id: t.id } });
    expect((await processUpload({ ctx: system(), input: { uploadId: t.id } })).status).toBe("done");

    // The URL is still within its lifetime: S3 (and the fake) accept the PUT.
    const other = sameLengthOtherBytes(bytes);
    await put(t.url!, t.headers, other);

    const row = await rowOf(t.id);
    expect(row.status).toBe("done");
    expect(sha256(await getObjectBytes(row.storageKey))).toBe(sha256(bytes));
    // The URL the browser was given names another object than the one the spectra came from.
    expect(decodeURIComponent(new URL(t.url!).pathname)).not.toContain(row.storageKey);
  });

  it("never presigns a PUT to a content-addressed key, and presigned URLs live minutes", async () => {
    const bytes = fileBytes(1);
    const { t, row } = await sendFile("short.csv", bytes);
    await expect(presignPut(row.storageKey, bytes.length)).rejects.toThrow(/staging/);
    // X-Amz-Expires is the URL's lifetime in seconds (SigV4 query authentication); "minutes" is
    // the rule of the product, 5 minutes at most (common practice for upload URLs).
    const expires = Number(new URL(t.url!).searchParams.get("X-Amz-Expires"));
    expect(expires).toBe(t.expiresInSeconds);
    expect(expires).toBeGreaterThanOrEqual(60);
    expect(expires).toBeLessThanOrEqual(300);
  });
});

describe("a transfer that went wrong", () => {
  it("bytes that do not match the declared SHA-256 are refused at completion and free the hash for the genuine file", async () => {
    const genuine = fileBytes(2);
    const t = await register("genuine.csv", genuine.length, sha256(genuine));
    await put(t.url!, t.headers, sameLengthOtherBytes(genuine));
    const err = await rejection(completeUpload({ ctx: lab.ctx("microscopist"), input: { id: t.id } }));
    expect(err.status).toBe(422);
    expect(err.message).toMatch(/SHA-256/);
    expect(err.message).toMatch(/upload the file again/i);

    // The genuine file is not a duplicate of the damaged transfer: it gets a URL and goes through.
    const again = await register("genuine.csv", genuine.length, sha256(genuine));
    expect(again).toMatchObject({ id: t.id, duplicate: false });
    expect(again.url).toBeTruthy();
    await put(again.url!, again.headers, genuine);
    await completeUpload({ ctx: lab.ctx("microscopist"), input: { id: t.id } });
    expect((await processUpload({ ctx: system(), input: { uploadId: t.id } })).status).toBe("done");
    expect(await db().select().from(spectra).where(eq(spectra.uploadId, t.id))).toHaveLength(1);
    expect(sha256(await getObjectBytes((await rowOf(t.id)).storageKey))).toBe(sha256(genuine));
  });

  it("stored bytes found damaged when processing free the hash too, and the genuine file then uploads", async () => {
    const genuine = fileBytes(3);
    const { t, row } = await sendFile("damaged.csv", genuine);
    // Damage the stored object behind the app's back (a storage fault), then process it.
    await putInternal(row.storageKey, sameLengthOtherBytes(genuine));
    const out = await processUpload({ ctx: system(), input: { uploadId: t.id } });
    expect(out).toMatchObject({ status: "failed" });
    expect((await rowOf(t.id)).message).toMatch(/upload the file again/i);

    const again = await register("damaged.csv", genuine.length, sha256(genuine));
    expect(again).toMatchObject({ id: t.id, duplicate: false });
    await put(again.url!, again.headers, genuine);
    await completeUpload({ ctx: lab.ctx("microscopist"), input: { id: t.id } });
    expect((await processUpload({ ctx: system(), input: { uploadId: t.id } })).status).toBe("done");
    expect(sha256(await getObjectBytes((await rowOf(t.id)).storageKey))).toBe(sha256(genuine));
  });

  it("bytes larger than declared are refused at completion and leave nothing in storage; the file can be sent again", async () => {
    const genuine = fileBytes(4);
    const t = await register("grown.csv", genuine.length, sha256(genuine));
    const bigger = new Uint8Array(genuine.length + 1000).fill(0x20);
    bigger.set(genuine);
    // The storage fake checks no signatures, so it takes the longer body (real S3 refuses it: the
    // URL signs content-length); the app must not keep it.
    await put(t.url!, t.headers, bigger);
    const before = await rowOf(t.id);
    expect(await objectSize(before.storageKey)).toBe(bigger.length);
    const err = await rejection(completeUpload({ ctx: lab.ctx("microscopist"), input: { id: t.id } }));
    expect(err.status).toBe(422);
    expect(err.message).toContain(String(bigger.length));
    expect(await objectSize(before.storageKey)).toBeNull();
    expect((await rowOf(t.id)).status).toBe("pending");

    const again = await register("grown.csv", genuine.length, sha256(genuine));
    expect(again).toMatchObject({ id: t.id, duplicate: false });
    await put(again.url!, again.headers, genuine);
    await completeUpload({ ctx: lab.ctx("microscopist"), input: { id: t.id } });
    expect((await processUpload({ ctx: system(), input: { uploadId: t.id } })).status).toBe("done");
  });
});

describe("files stored before staging", () => {
  it("are read from the key their row names (labs/<lab>/raw/<sha256>)", async () => {
    const bytes = fileBytes(5);
    const sha = sha256(bytes);
    const key = `labs/${lab.lab.id}/raw/${sha}`;
    await putInternal(key, bytes);
    const [row] = await db()
      .insert(uploads)
      .values({ labId: lab.lab.id, sessionId, fileName: "before.csv", sizeBytes: bytes.length, sha256: sha, storageKey: key, status: "queued" })
      .returning();
    expect((await processUpload({ ctx: system(), input: { uploadId: row.id } })).status).toBe("done");
    expect(await db().select().from(spectra).where(eq(spectra.uploadId, row.id))).toHaveLength(1);
    expect((await register("before.csv", bytes.length, sha)).duplicate).toBe(true);
  });

  it("a file failed on a hash mismatch before is opened again by migration 0007, and the genuine file uploads", async () => {
    const genuine = fileBytes(6);
    const sha = sha256(genuine);
    const [row] = await db()
      .insert(uploads)
      .values({
        labId: lab.lab.id, sessionId, fileName: "blocked.csv", sizeBytes: genuine.length, sha256: sha,
        storageKey: `labs/${lab.lab.id}/raw/${sha}`, status: "failed",
        message: "The stored bytes do not match the file's SHA-256: the transfer was damaged. Upload the file again.",
      })
      .returning();
    expect((await register("blocked.csv", genuine.length, sha)).duplicate).toBe(true);
    // The migration's data statement, as written in the committed file.
    const sql = fs.readFileSync("drizzle/0007_upload_hash_mismatch.sql", "utf8").split("--> statement-breakpoint").map((x) => x.trim());
    const update = sql.find((x) => /UPDATE "uploads"/.test(x))!;
    await db().execute(update);
    const again = await register("blocked.csv", genuine.length, sha);
    expect(again).toMatchObject({ id: row.id, duplicate: false });
    await put(again.url!, again.headers, genuine);
    await completeUpload({ ctx: lab.ctx("microscopist"), input: { id: row.id } });
    expect((await processUpload({ ctx: system(), input: { uploadId: row.id } })).status).toBe("done");
    expect(sha256(await getObjectBytes((await rowOf(row.id)).storageKey))).toBe(sha);
  });
});

/** Writes an object with storage credentials of its own (not the app's code, not a presigned URL): a storage fault. */
async function putInternal(key: string, body: Uint8Array) {
  const e = env();
  const s3 = new S3Client({
    region: e.S3_REGION,
    endpoint: e.S3_ENDPOINT,
    forcePathStyle: e.S3_FORCE_PATH_STYLE,
    credentials: { accessKeyId: e.S3_ACCESS_KEY_ID, secretAccessKey: e.S3_SECRET_ACCESS_KEY },
    requestChecksumCalculation: "WHEN_REQUIRED",
  });
  await s3.send(new PutObjectCommand({ Bucket: e.S3_BUCKET, Key: key, Body: body }));
  s3.destroy();
}
