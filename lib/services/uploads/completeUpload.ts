import "server-only";
import { and, eq } from "drizzle-orm";
import { uploads } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import { enqueueProcessUpload } from "@/lib/jobs/queue";
import { objectSize } from "@/lib/storage/s3";
import { recordAudit } from "../audit";
import type { Ctx } from "@/lib/base/context";
import { conflict, invalid } from "@/lib/base/errors";
import { loadUpload } from "./shared";

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
