import "server-only";
import { isNull } from "drizzle-orm";
import { setupCodes } from "@/db/schema";
import type { SystemCtx } from "@/lib/base/context";
import { newSetupCode, ownLabExists, setupCodeHash } from "./shared";

/**
 * A fresh one-time setup code while the installation has no lab of its own, else `null`. Unused
 * older codes stop working (the latest start log's code is the one); only the hash is stored.
 * Called on every start of the stack (scripts/setup-code.ts), which prints the code.
 */
export async function issueSetupCode({ ctx }: { ctx: SystemCtx }): Promise<{ code: string | null }> {
  return ctx.db.transaction(async (tx) => {
    if (await ownLabExists(tx)) return { code: null };
    const code = newSetupCode();
    await tx.delete(setupCodes).where(isNull(setupCodes.usedAt));
    await tx.insert(setupCodes).values({ codeHash: setupCodeHash(code) });
    return { code };
  });
}
