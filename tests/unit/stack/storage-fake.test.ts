import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { GetObjectCommand, PutObjectCommand, S3Client } from "@aws-sdk/client-s3";
import { getSignedUrl } from "@aws-sdk/s3-request-presigner";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { startStorageFake } from "@/storage-fake/s3.mjs";

let fake: { url: string; close: () => Promise<void> };
let dir: string;
let s3: S3Client;
const Bucket = "bandcross-raw";

beforeAll(async () => {
  dir = fs.mkdtempSync(path.join(os.tmpdir(), "bx-s3-"));
  fake = await startStorageFake({ port: 0, directory: dir, buckets: [Bucket] });
  s3 = new S3Client({
    endpoint: fake.url,
    region: "us-east-1",
    forcePathStyle: true,
    credentials: { accessKeyId: "S3RVER", secretAccessKey: "S3RVER" },
    requestChecksumCalculation: "WHEN_REQUIRED",
    responseChecksumValidation: "WHEN_REQUIRED",
  });
});

afterAll(async () => {
  s3?.destroy();
  await fake?.close();
  fs.rmSync(dir, { recursive: true, force: true });
});

describe("storage fake", () => {
  it("accepts a browser-style presigned PUT from another origin and exposes the ETag", async () => {
    const url = await getSignedUrl(s3, new PutObjectCommand({ Bucket, Key: "raw/a.dat" }), { expiresIn: 60 });
    const preflight = await fetch(url, {
      method: "OPTIONS",
      headers: {
        origin: "http://localhost:3000",
        "access-control-request-method": "PUT",
        "access-control-request-headers": "content-type",
      },
    });
    expect(preflight.status).toBe(200);
    expect(preflight.headers.get("access-control-allow-methods")).toContain("PUT");

    const put = await fetch(url, { method: "PUT", body: "bias,current\n0.1,2e-12\n", headers: { origin: "http://localhost:3000" } });
    expect(put.status).toBe(200);
    expect(put.headers.get("etag")).toMatch(/^"[0-9a-f]{32}"$/);
    expect(put.headers.get("access-control-expose-headers")).toContain("ETag");

    const got = await s3.send(new GetObjectCommand({ Bucket, Key: "raw/a.dat" }));
    expect(await got.Body!.transformToString()).toBe("bias,current\n0.1,2e-12\n");
  });
});
