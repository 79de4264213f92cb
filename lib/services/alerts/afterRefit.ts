import "server-only";
import type { DbOrTx } from "@/db/client";
import type { RefitResult } from "../analysis/refitSample";

/**
 * Called by the worker after every refit of a sample: decides whether the new fit is an event
 * people watching the sample must hear about (first crossing, moved outside the earlier interval).
 */
export async function afterRefit(_db: DbOrTx, _result: RefitResult): Promise<void> {
  // Crossing events and e-mail are added with the alerts feature.
}
