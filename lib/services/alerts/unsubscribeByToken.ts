import "server-only";
import { and, eq } from "drizzle-orm";
import type { SystemCtx } from "@/lib/base/context";
import { subscriptions } from "@/db/schema";
import { readToken } from "./unsubscribeLink";

/** The one click on the unsubscribe page (a POST): removes the subscription. Idempotent. */
export async function unsubscribeByToken({ ctx, input }: { ctx: SystemCtx; input: { token: string } }): Promise<{ ok: boolean }> {
  const t = readToken(input.token);
  if (!t) return { ok: false };
  await ctx.db.delete(subscriptions).where(and(eq(subscriptions.userId, t.userId), eq(subscriptions.sampleId, t.sampleId)));
  return { ok: true };
}
