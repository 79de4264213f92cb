import "server-only";
import type { SystemCtx } from "@/lib/base/context";
import { fail } from "./shared";

/** After the queue's last retry: the file is marked failed with the reason, and its bytes are kept. */
export async function markUploadFailed({ ctx, input }: { ctx: SystemCtx; input: { uploadId: string; error: unknown } }): Promise<void> {
  const { db } = ctx;
  const { uploadId: id, error } = input;
  const reason = error instanceof Error ? error.message : String(error);
  await fail(db, id, `Processing failed after several attempts (${reason}). The raw file is kept; retry once the problem is fixed.`, true);
}
