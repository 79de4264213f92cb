import "server-only";
import { randomUUID } from "node:crypto";
import { and, eq, inArray, or } from "drizzle-orm";
import { measurementSessions, uploads, type Upload } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import { env } from "@/lib/env";
import { createUploadsInput } from "@/lib/schemas/uploads";
import { presignPut, stagingKey } from "@/lib/storage/s3";
import { recordAudit } from "../audit";
import type { Ctx } from "@/lib/base/context";
import { notFound, tooLarge } from "@/lib/base/errors";
import { parseInput } from "../parse";

const duplicateTicket = (u: Upload): UploadTicket => ({
  ...{ id: u.id, name: u.fileName, status: u.status, duplicate: true, url: null },
  ...{ method: "PUT", headers: {}, expiresInSeconds: null },
});

const canSendAgain = (u: Upload) => u.status === "pending" || (u.status === "failed" && u.hashMismatch);

/**
 * Opens a registered file for its bytes again: a pending one keeps its row; one whose stored
 * bytes did not match its hash (it holds no file) is pending again. Either way the bytes go to a
 * staging key of the row (rows registered before staging named the content-addressed key).
 */
async function sendAgain(ctx: Ctx, u: Upload, size: number): Promise<Upload> {
  const [row] = await ctx.db
    .update(uploads)
    .set({
      ...{ status: "pending" as const, hashMismatch: false, message: null, sizeBytes: size },
      ...{ storageKey: stagingKey(u.labId, u.id), updatedAt: new Date() },
    })
    .where(and(eq(uploads.id, u.id), or(eq(uploads.status, "pending"), and(eq(uploads.status, "failed"), eq(uploads.hashMismatch, true)))))
    .returning();
  return row ?? (await ctx.db.select().from(uploads).where(eq(uploads.id, u.id)))[0];
}

export interface UploadTicket {
  id: string;
  name: string;
  status: string;
  /** Already in this lab (same SHA-256): nothing to send. */
  duplicate: boolean;
  url: string | null;
  method: "PUT";
  headers: Record<string, string>;
  expiresInSeconds: number | null;
}

/**
 * Registers files of a session and returns a presigned PUT per file, so the bytes go straight from
 * the browser or the acquisition PC to object storage, to a staging key of the upload (completion
 * checks them and copies them to the content-addressed key no URL can write). A file whose SHA-256
 * is already in the lab is recognised and not stored twice.
 */
export async function createUploads({ ctx, input }: { ctx: Ctx; input: unknown }): Promise<{ uploads: UploadTicket[] }> {
  assertCan(ctx.actor, "upload:write");
  const data = parseInput(createUploadsInput, input);
  const max = env().UPLOAD_MAX_BYTES;
  const big = data.files.find((f) => f.size > max);
  if (big) throw tooLarge(`${big.name} is ${(big.size / 1e6).toFixed(1)} MB; the largest file Bandcross accepts is ${(max / 1e6).toFixed(0)} MB. Split the grid into several files.`);
  const [session] = await ctx.db
    .select({ id: measurementSessions.id })
    .from(measurementSessions)
    .where(and(eq(measurementSessions.id, data.sessionId), eq(measurementSessions.labId, ctx.actor.labId)));
  if (!session) throw notFound("session");

  const shas = [...new Set(data.files.map((f) => f.sha256))];
  const existing = await ctx.db.select().from(uploads).where(and(eq(uploads.labId, ctx.actor.labId), inArray(uploads.sha256, shas)));
  const bySha = new Map(existing.map((u) => [u.sha256, u]));
  const out: UploadTicket[] = [];
  for (const f of data.files) {
    const dup = bySha.get(f.sha256);
    // A registered file whose bytes never arrived, or whose bytes did not match its hash, may be sent again.
    if (dup && !canSendAgain(dup)) {
      out.push(duplicateTicket(dup));
      continue;
    }
    const id = randomUUID();
    const row = dup
      ? await sendAgain(ctx, dup, f.size)
      : ((
          await ctx.db
            .insert(uploads)
            .values({
              ...{ id, labId: ctx.actor.labId, sessionId: data.sessionId, fileName: f.name, sizeBytes: f.size },
              ...{ sha256: f.sha256, storageKey: stagingKey(ctx.actor.labId, id), status: "pending" as const },
              createdBy: ctx.actor.userId,
            })
            .onConflictDoNothing()
            .returning()
        )[0] ?? (await ctx.db.select().from(uploads).where(and(eq(uploads.labId, ctx.actor.labId), eq(uploads.sha256, f.sha256))))[0]);
    bySha.set(f.sha256, row);
    if (!canSendAgain(row)) {
      out.push(duplicateTicket(row));
      continue;
    }
    const put = await presignPut(row.storageKey, f.size);
    out.push({ id: row.id, name: row.fileName, status: row.status, duplicate: false, url: put.url, method: "PUT", headers: put.headers, expiresInSeconds: put.expiresInSeconds });
  }
  await recordAudit(ctx, "upload.create", { type: "session", id: data.sessionId }, { files: data.files.length, duplicates: out.filter((u) => u.duplicate).length });
  return { uploads: out };
}
