import "server-only";
import { and, eq } from "drizzle-orm";
import { uploads, type Upload } from "@/db/schema";
import { sha256Hex } from "@/lib/auth/secrets";
import { assertCan } from "@/lib/base/permissions";
import { enqueueProcessUpload } from "@/lib/jobs/queue";
import { deleteObject, getObjectBytes, objectSize, putObjectBytes, rawKey } from "@/lib/storage/s3";
import { recordAudit } from "../audit";
import type { Ctx } from "@/lib/base/context";
import { conflict, invalid } from "@/lib/base/errors";
import { loadUpload } from "./shared";

const notArrived =
  "The file has not arrived in storage yet: send it with the presigned URL first (or ask for a new one if it expired).";
const sizeDiffers = (held: number, announced: number) =>
  `Storage holds ${held} bytes but ${announced} were announced; upload the file again.`;

/**
 * The browser or script says the bytes are in storage. They sit at the upload's staging key, which
 * a presigned URL may still write: they are read once, their size and SHA-256 checked against what
 * was declared, and those very bytes stored at the content-addressed key no URL can write; then
 * processing is queued. Bytes of another size or hash are removed and the upload stays open for
 * the genuine file (422). Idempotent: an upload already queued, processing or done is reported as it is.
 */
export async function completeUpload({ ctx, input }: { ctx: Ctx; input: { id: string } }) {
  assertCan(ctx.actor, "upload:write");
  const u = await loadUpload(ctx, input.id);
  if (u.status !== "pending") return { id: u.id, status: u.status };
  const target = rawKey(u.labId, u.sha256);
  const reported = async () => {
    // A completion running at the same time may have stored the file and removed the staged bytes.
    const now = await loadUpload(ctx, u.id);
    if (now.status !== "pending") return { id: now.id, status: now.status };
    throw conflict(notArrived);
  };
  const size = await objectSize(u.storageKey);
  if (size == null) return reported();
  if (size !== u.sizeBytes) {
    await refuse(ctx, u, sizeDiffers(size, u.sizeBytes));
  }
  const bytes = await getObjectBytes(u.storageKey).catch((e) => (isNotFound(e) ? null : Promise.reject(e)));
  if (!bytes) return reported();
  if (bytes.length !== u.sizeBytes) {
    await refuse(ctx, u, sizeDiffers(bytes.length, u.sizeBytes));
  }
  const got = sha256Hex(bytes);
  if (got !== u.sha256) {
    const message =
      `The bytes received do not match the file's SHA-256 ` +
      `(${u.sha256.slice(0, 12)}…, received ${got.slice(0, 12)}…): ` +
      "the transfer was damaged or the file changed. Upload the file again.";
    await refuse(ctx, u, message);
  }
  // The checked bytes themselves (not a copy of the staging key, which a URL may have rewritten since).
  await putObjectBytes(target, bytes);
  // Queue first: if that fails the upload stays pending and "complete" can simply be called again.
  await enqueueProcessUpload(u.id);
  const [row] = await ctx.db
    .update(uploads)
    .set({ status: "queued", storageKey: target, message: null, hashMismatch: false, updatedAt: new Date() })
    .where(and(eq(uploads.id, u.id), eq(uploads.status, "pending")))
    .returning();
  if (u.storageKey !== target) await deleteObject(u.storageKey);
  await recordAudit(ctx, "upload.complete", { type: "upload", id: u.id });
  return { id: u.id, status: row?.status ?? "queued" };
}

/** Removes bytes that are not the declared file (never a content-addressed copy) and refuses with the reason. */
type Staged = Pick<Upload, "id" | "labId" | "sha256" | "storageKey">;
async function refuse(ctx: Ctx, u: Staged, message: string): Promise<never> {
  if (u.storageKey !== rawKey(u.labId, u.sha256)) await deleteObject(u.storageKey);
  await ctx.db
    .update(uploads)
    .set({ message, updatedAt: new Date() })
    .where(and(eq(uploads.id, u.id), eq(uploads.status, "pending")));
  throw invalid(message);
}

const isNotFound = (e: unknown) =>
  (e as { name?: string }).name === "NoSuchKey" ||
  (e as { $metadata?: { httpStatusCode?: number } }).$metadata?.httpStatusCode === 404;
