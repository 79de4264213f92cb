import "server-only";
import { and, asc, eq } from "drizzle-orm";
import { measurementSessions, spectra, uploads } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import { enqueueProcessUpload } from "@/lib/jobs/queue";
import { objectSize } from "@/lib/storage/s3";
import { recordAudit } from "../audit";
import type { Ctx } from "@/lib/base/context";
import { conflict, invalid, notFound } from "@/lib/base/errors";
import { isUuid } from "../samples/getSample";
import { assertSampleVisible } from "../samples/visibility";
import { getSession } from "../sessions/sessions";

/** An upload of the actor's lab, whose session's sample the actor may see (collaborators may be limited to chosen samples). */
async function loadUpload(ctx: Ctx, id: string) {
  if (!isUuid(id)) throw notFound("upload");
  const [row] = await ctx.db
    .select({ u: uploads, sampleId: measurementSessions.sampleId })
    .from(uploads)
    .innerJoin(measurementSessions, eq(measurementSessions.id, uploads.sessionId))
    .where(and(eq(uploads.id, id), eq(uploads.labId, ctx.actor.labId)));
  if (!row) throw notFound("upload");
  await assertSampleVisible(ctx, row.sampleId, "upload");
  return row.u;
}

export async function getUpload({ ctx, input }: { ctx: Ctx; input: { id: string } }) {
  assertCan(ctx.actor, "lab:read");
  const u = await loadUpload(ctx, input.id);
  const ids = await ctx.db.select({ id: spectra.id }).from(spectra).where(eq(spectra.uploadId, u.id)).orderBy(asc(spectra.sourceName), asc(spectra.indexInFile));
  return {
    id: u.id,
    sessionId: u.sessionId,
    name: u.fileName,
    size: u.sizeBytes,
    sha256: u.sha256,
    status: u.status,
    message: u.message,
    /** A failed file that processing again may fix (true), or one whose bytes cannot be read as they are (false). */
    retryable: u.status === "failed" && u.retryable,
    warnings: u.warnings,
    spectraCount: u.spectraCount,
    spectrumIds: ids.map((r) => r.id),
    createdAt: u.createdAt.toISOString(),
    updatedAt: u.updatedAt.toISOString(),
  };
}

/**
 * The browser or script says the bytes are in storage: check they are, then queue processing.
 * Idempotent: an upload already queued, processing or done is reported as it is.
 */
export async function completeUpload({ ctx, input }: { ctx: Ctx; input: { id: string } }) {
  assertCan(ctx.actor, "upload:write");
  const u = await loadUpload(ctx, input.id);
  if (u.status !== "pending") return { id: u.id, status: u.status };
  const size = await objectSize(u.storageKey);
  if (size == null) throw conflict("The file has not arrived in storage yet: send it with the presigned URL first (or ask for a new one if it expired).");
  if (size !== u.sizeBytes) throw invalid(`Storage holds ${size} bytes but ${u.sizeBytes} were announced; upload the file again.`);
  // Queue first: if that fails the upload stays pending and "complete" can simply be called again.
  await enqueueProcessUpload(u.id);
  const [row] = await ctx.db
    .update(uploads)
    .set({ status: "queued", updatedAt: new Date() })
    .where(and(eq(uploads.id, u.id), eq(uploads.status, "pending")))
    .returning();
  await recordAudit(ctx, "upload.complete", { type: "upload", id: u.id });
  return { id: u.id, status: row?.status ?? "queued" };
}

/** A person asks to process a failed file again (its raw bytes were kept). */
export async function retryUpload({ ctx, input }: { ctx: Ctx; input: { id: string } }) {
  assertCan(ctx.actor, "upload:write");
  const u = await loadUpload(ctx, input.id);
  if (u.status !== "failed") throw conflict(`Only a failed upload can be retried; this one is ${u.status}.`);
  await ctx.db.update(uploads).set({ status: "queued", message: null, retryable: false, updatedAt: new Date() }).where(eq(uploads.id, u.id));
  await enqueueProcessUpload(u.id, { retry: true });
  await recordAudit(ctx, "upload.retry", { type: "upload", id: u.id });
  return { id: u.id, status: "queued" as const };
}

export async function listSessionUploads({ ctx, input }: { ctx: Ctx; input: { sessionId: string } }) {
  assertCan(ctx.actor, "lab:read");
  if (!isUuid(input.sessionId)) throw notFound("session");
  await getSession({ ctx, input: { id: input.sessionId } });
  const rows = await ctx.db
    .select()
    .from(uploads)
    .where(and(eq(uploads.sessionId, input.sessionId), eq(uploads.labId, ctx.actor.labId)))
    .orderBy(asc(uploads.createdAt));
  return rows.map((u) => ({ id: u.id, name: u.fileName, size: u.sizeBytes, status: u.status, message: u.message, retryable: u.status === "failed" && u.retryable, warnings: u.warnings, spectraCount: u.spectraCount, updatedAt: u.updatedAt.toISOString() }));
}
