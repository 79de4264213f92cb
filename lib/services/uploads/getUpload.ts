import "server-only";
import { asc, eq } from "drizzle-orm";
import { spectra } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import type { Ctx } from "@/lib/base/context";
import { loadUpload } from "./shared";

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
    /** I(z) approach curves read from the file (`GET /sessions/{id}/barrier` lists them with their κ). */
    curvesCount: u.curvesCount,
    spectrumIds: ids.map((r) => r.id),
    createdAt: u.createdAt.toISOString(),
    updatedAt: u.updatedAt.toISOString(),
  };
}
