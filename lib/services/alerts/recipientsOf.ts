import "server-only";
import { and, eq, sql } from "drizzle-orm";
import type { DbCtx } from "@/lib/base/context";
import { memberships, subscriptions, users } from "@/db/schema";

/**
 * Who hears about a sample now: its subscribers who are still members of its lab and may still see
 * it. A collaborator limited to chosen samples (rows in sample_access) sees only those, the same
 * rule as lib/services/samples/visibility.ts, written here for any user rather than the actor.
 */
export async function recipientsOf({ ctx, input }: { ctx: DbCtx; input: { sampleId: string } }): Promise<{ userId: string; email: string; name: string }[]> {
  const { sampleId } = input;
  return ctx.db
    .select({ userId: users.id, email: users.email, name: users.name })
    .from(subscriptions)
    .innerJoin(memberships, and(eq(memberships.userId, subscriptions.userId), eq(memberships.labId, subscriptions.labId)))
    .innerJoin(users, eq(users.id, subscriptions.userId))
    .where(
      and(
        eq(subscriptions.sampleId, sampleId),
        sql`(${memberships.role} <> 'collaborator'
          or not exists (select 1 from sample_access a where a.lab_id = ${memberships.labId} and a.user_id = ${memberships.userId})
          or exists (select 1 from sample_access a where a.sample_id = ${sampleId} and a.user_id = ${memberships.userId}))`,
      ),
    );
}
