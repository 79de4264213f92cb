import "server-only";
import type { SystemCtx } from "@/lib/base/context";
import { ownLabExists } from "./shared";

/**
 * Whether `/setup` is open: until the installation holds a lab of its own (any lab but the demo
 * lab). Read by the sign-in page (its link to setup) and the setup page (404 once closed).
 */
export async function getSetupState({ ctx }: { ctx: SystemCtx }): Promise<{ open: boolean }> {
  return { open: !(await ownLabExists(ctx.db)) };
}
