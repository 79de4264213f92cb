import "server-only";
import { asc, eq } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { labs, memberships } from "@/db/schema";

/** The labs a user belongs to, with the role in each (for the session and the lab switcher). */
export async function listMembershipsOfUser({ db, userId }: { db: DbOrTx; userId: string }) {
  return db
    .select({ id: labs.id, slug: labs.slug, name: labs.name, role: memberships.role })
    .from(memberships)
    .innerJoin(labs, eq(labs.id, memberships.labId))
    .where(eq(memberships.userId, userId))
    .orderBy(asc(labs.name));
}
