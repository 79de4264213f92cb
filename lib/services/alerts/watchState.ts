import "server-only";
import { and, eq } from "drizzle-orm";
import { subscriptions } from "@/db/schema";
import type { Ctx } from "@/lib/base/context";
import { getSample } from "../samples/getSample";

/** Whether the actor watches a sample they can see. */
export async function watchState({ ctx, input }: { ctx: Ctx; input: { sampleId: string } }): Promise<{ sampleId: string; watching: boolean }> {
  const sample = await getSample({ ctx, input: { id: input.sampleId } });
  const [row] = await ctx.db.select({ id: subscriptions.id }).from(subscriptions).where(and(eq(subscriptions.sampleId, sample.id), eq(subscriptions.userId, ctx.actor.userId)));
  return { sampleId: sample.id, watching: Boolean(row) };
}
