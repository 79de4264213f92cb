import "server-only";
import { and, eq } from "drizzle-orm";
import type { SystemCtx } from "@/lib/base/context";
import { labs, samples, subscriptions, users } from "@/db/schema";
import { readToken } from "./unsubscribeLink";

/** For the unsubscribe page (GET, no change): whose link it is, for which sample, and whether they still watch it. */
export async function describeUnsubscribe({ ctx, input }: { ctx: SystemCtx; input: { token: string } }) {
  const { db } = ctx;
  const t = readToken(input.token);
  if (!t) return null;
  const [row] = await db
    .select({ sampleName: samples.name, labName: labs.name, email: users.email })
    .from(samples)
    .innerJoin(labs, eq(labs.id, samples.labId))
    .innerJoin(users, eq(users.id, t.userId))
    .where(eq(samples.id, t.sampleId));
  if (!row) return null;
  const [sub] = await db.select({ id: subscriptions.id }).from(subscriptions).where(and(eq(subscriptions.userId, t.userId), eq(subscriptions.sampleId, t.sampleId)));
  return { ...row, watching: Boolean(sub) };
}
