import "server-only";
import { DeleteObjectCommand, GetObjectCommand, HeadObjectCommand, PutObjectCommand, S3Client } from "@aws-sdk/client-s3";
import { getSignedUrl } from "@aws-sdk/s3-request-presigner";
import { env } from "@/lib/env";

/**
 * Object storage for raw files. The same code talks to the local fake (storage-fake/s3.mjs) and to
 * real S3 or any S3-compatible service: only the environment differs (docker-free-dev.md). The
 * fake verifies no signatures, so access control is the app's: it alone hands out presigned URLs.
 */
const globalForS3 = globalThis as unknown as { bandcrossS3?: { internal: S3Client; presign: S3Client } };

function clients() {
  if (!globalForS3.bandcrossS3) {
    const e = env();
    const base = {
      region: e.S3_REGION,
      credentials: { accessKeyId: e.S3_ACCESS_KEY_ID, secretAccessKey: e.S3_SECRET_ACCESS_KEY },
      forcePathStyle: e.S3_FORCE_PATH_STYLE,
      // Without these, a streamed body is stored with its chunk framing by some S3-compatible servers.
      requestChecksumCalculation: "WHEN_REQUIRED" as const,
      responseChecksumValidation: "WHEN_REQUIRED" as const,
    };
    globalForS3.bandcrossS3 = {
      internal: new S3Client({ ...base, ...(e.S3_ENDPOINT && { endpoint: e.S3_ENDPOINT }) }),
      // Presigned URLs are opened by the browser, which may reach storage under another address.
      presign: new S3Client({ ...base, ...((e.S3_PUBLIC_ENDPOINT ?? e.S3_ENDPOINT) && { endpoint: e.S3_PUBLIC_ENDPOINT ?? e.S3_ENDPOINT }) }),
    };
  }
  return globalForS3.bandcrossS3;
}

/**
 * Lifetime of a presigned PUT. Anyone holding the URL may write its key until then, so it is short;
 * clients ask again for a file whose URL is about to run out (`bandcross push`, the upload panel).
 */
export const PRESIGN_SECONDS = 5 * 60;

const STAGING = "staging/";
const RAW = "raw/";

/**
 * Where a lab's raw file lives once its SHA-256 was checked: content-addressed, so the same bytes
 * are stored once per lab. Only the server writes here (`putObjectBytes`), never a presigned URL.
 * Files stored before staging existed sit at `labs/<lab>/raw/<sha256>`; their upload rows name
 * that key, and every read goes through the row's key.
 */
export function rawKey(labId: string, sha256: string): string {
  return `${RAW}${labId}/${sha256}`;
}

/** Where the browser or the command line puts an upload's bytes with a presigned PUT. */
export function stagingKey(labId: string, uploadId: string): string {
  return `${STAGING}${labId}/${uploadId}`;
}

export const isStagingKey = (key: string) => key.startsWith(STAGING);

/**
 * A presigned PUT for a staging key (refused for any other: the bytes a spectrum came from are
 * never writable by a URL). The signature covers content-length, so S3 refuses a body of another
 * size than declared (the storage fake checks no signatures; completion checks the size again).
 */
export async function presignPut(key: string, size: number): Promise<{ url: string; headers: Record<string, string>; expiresInSeconds: number }> {
  if (!isStagingKey(key)) throw new Error(`presigned PUTs go to staging keys only, not ${key}`);
  const command = new PutObjectCommand({ Bucket: env().S3_BUCKET, Key: key, ContentType: "application/octet-stream", ContentLength: size });
  const url = await getSignedUrl(clients().presign, command, {
    expiresIn: PRESIGN_SECONDS,
    signableHeaders: new Set(["content-type", "content-length"]),
  });
  return { url, headers: { "content-type": "application/octet-stream" }, expiresInSeconds: PRESIGN_SECONDS };
}

/** Stores bytes under a key with the app's own credentials (the content-addressed copy of a checked upload). */
export async function putObjectBytes(key: string, body: Uint8Array): Promise<void> {
  await clients().internal.send(
    new PutObjectCommand({
      Bucket: env().S3_BUCKET,
      Key: key,
      Body: body,
      ContentLength: body.length,
      ContentType: "application/octet-stream",
    }),
  );
}

/** Removes an object (absent is fine). */
export async function deleteObject(key: string): Promise<void> {
  await clients().internal.send(new DeleteObjectCommand({ Bucket: env().S3_BUCKET, Key: key }));
}

/** Size of a stored object, or null when it is not there. */
export async function objectSize(key: string): Promise<number | null> {
  try {
    const head = await clients().internal.send(new HeadObjectCommand({ Bucket: env().S3_BUCKET, Key: key }));
    return head.ContentLength ?? 0;
  } catch (e) {
    const status = (e as { $metadata?: { httpStatusCode?: number } }).$metadata?.httpStatusCode;
    if (status === 404 || (e as { name?: string }).name === "NotFound") return null;
    throw e;
  }
}

export async function getObjectBytes(key: string): Promise<Uint8Array> {
  const res = await clients().internal.send(new GetObjectCommand({ Bucket: env().S3_BUCKET, Key: key }));
  if (!res.Body) throw new Error(`object ${key} has no body`);
  return res.Body.transformToByteArray();
}

