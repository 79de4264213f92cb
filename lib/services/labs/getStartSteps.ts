import "server-only";
import { desc, eq, sql } from "drizzle-orm";
import { measurementSessions, samples, tips, uploads } from "@/db/schema";
import type { Ctx } from "@/lib/base/context";
import { assertCan, can } from "@/lib/base/permissions";

const exists = (table: typeof tips | typeof samples | typeof measurementSessions, labId: string) =>
  sql<boolean>`exists (select 1 from ${table} where ${table.labId} = ${labId})`;

/**
 * A new lab's first steps and which are done: a tip, a sample, a session, then an upload. The
 * pages show them until the lab's first file is uploaded. `uploadSessionId` is the latest session
 * (where files are dropped), for those who may upload.
 */
export async function getStartSteps({ ctx }: { ctx: Ctx }) {
  assertCan(ctx.actor, "lab:read");
  const labId = ctx.actor.labId;
  const [row] = await ctx.db
    .select({
      tip: exists(tips, labId),
      sample: exists(samples, labId),
      session: exists(measurementSessions, labId),
      // A file counts once its bytes arrived (a registered upload never sent stays `pending`).
      upload: sql<boolean>`exists (select 1 from ${uploads}
        where ${uploads.labId} = ${labId} and ${uploads.status} <> 'pending')`,
    })
    .from(sql`(select 1) as one`);
  let uploadSessionId: string | null = null;
  if (row.session && can(ctx.actor.role, "upload:write")) {
    const [latest] = await ctx.db
      .select({ id: measurementSessions.id })
      .from(measurementSessions)
      .where(eq(measurementSessions.labId, labId))
      .orderBy(desc(measurementSessions.createdAt))
      .limit(1);
    uploadSessionId = latest?.id ?? null;
  }
  return { ...row, uploadSessionId, allDone: row.tip && row.sample && row.session && row.upload };
}
