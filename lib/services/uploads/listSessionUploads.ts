import "server-only";
import { and, asc, eq } from "drizzle-orm";
import { uploads } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import type { Ctx } from "@/lib/base/context";
import { notFound } from "@/lib/base/errors";
import { isUuid } from "../samples/getSample";
import { getSession } from "../sessions/getSession";

export async function listSessionUploads({ ctx, input }: { ctx: Ctx; input: { sessionId: string } }) {
  assertCan(ctx.actor, "lab:read");
  if (!isUuid(input.sessionId)) throw notFound("session");
  await getSession({ ctx, input: { id: input.sessionId } });
  const rows = await ctx.db
    .select()
    .from(uploads)
    .where(and(eq(uploads.sessionId, input.sessionId), eq(uploads.labId, ctx.actor.labId)))
    .orderBy(asc(uploads.createdAt));
  return rows.map((u) => ({ id: u.id, name: u.fileName, size: u.sizeBytes, status: u.status, message: u.message, retryable: u.status === "failed" && u.retryable, warnings: u.warnings, spectraCount: u.spectraCount, curvesCount: u.curvesCount, updatedAt: u.updatedAt.toISOString() }));
}
