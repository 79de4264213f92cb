import "server-only";
import { eq } from "drizzle-orm";
import { uploads } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import { enqueueProcessUpload } from "@/lib/jobs/queue";
import { recordAudit } from "../audit";
import type { Ctx } from "@/lib/base/context";
import { conflict } from "@/lib/base/errors";
import { loadUpload } from "./shared";

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
