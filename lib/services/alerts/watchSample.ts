import "server-only";
import { and, eq } from "drizzle-orm";
import { z } from "zod";
import { subscriptions } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import type { Ctx } from "@/lib/base/context";
import { parseInput } from "../parse";
import { getSample } from "../samples/getSample";

export const watchSampleInput = z.object({
  sampleId: z.string().uuid("sampleId must be a sample id."),
  watching: z.preprocess((v) => (v === "true" ? true : v === "false" ? false : v), z.boolean({ error: "watching is true or false." })),
});

/**
 * Starts or stops the actor's e-mails and notifications about one sample. Every member may watch
 * the samples they can see (a collaborator limited to chosen samples only those); a sample they
 * cannot see is "not found". Idempotent.
 */
export async function watchSample({ ctx, input }: { ctx: Ctx; input: unknown }): Promise<{ sampleId: string; watching: boolean }> {
  assertCan(ctx.actor, "lab:read");
  const data = parseInput(watchSampleInput, input);
  const sample = await getSample({ ctx, input: { id: data.sampleId } });
  if (data.watching) {
    await ctx.db.insert(subscriptions).values({ labId: sample.labId, sampleId: sample.id, userId: ctx.actor.userId }).onConflictDoNothing();
  } else {
    await ctx.db.delete(subscriptions).where(and(eq(subscriptions.sampleId, sample.id), eq(subscriptions.userId, ctx.actor.userId)));
  }
  return { sampleId: sample.id, watching: data.watching };
}
