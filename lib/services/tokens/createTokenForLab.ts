import "server-only";
import { and, asc, eq } from "drizzle-orm";
import { labs, memberships, users } from "@/db/schema";
import type { SystemCtx } from "@/lib/base/context";
import { notFound } from "@/lib/base/errors";
import { insertToken } from "./shared";

/**
 * For the server-side command line (`bandcross token create --lab SLUG [--email E]`): a token for
 * a member of the lab, by default its first owner. Whoever can run this already holds the database.
 */
export async function createTokenForLab({ ctx, input }: { ctx: SystemCtx; input: { labSlug: string; email?: string; name?: string } }) {
  const { db } = ctx;
  const { labSlug, email, name } = input;
  const [lab] = await db.select().from(labs).where(eq(labs.slug, labSlug));
  if (!lab) throw notFound("lab");
  const rows = await db
    .select({ userId: users.id, email: users.email, role: memberships.role })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(and(eq(memberships.labId, lab.id), email ? eq(users.email, email.toLowerCase()) : eq(memberships.role, "owner")))
    .orderBy(asc(memberships.createdAt))
    .limit(1);
  if (!rows[0]) throw notFound(email ? `member ${email}` : "owner");
  const result = await insertToken(db, lab.id, rows[0].userId, name ?? "command line", null);
  return { ...result, lab: { id: lab.id, slug: lab.slug }, member: rows[0] };
}
