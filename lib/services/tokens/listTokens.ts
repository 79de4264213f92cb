import "server-only";
import { desc, eq } from "drizzle-orm";
import { apiTokens, users } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import type { Ctx } from "@/lib/base/context";

export async function listTokens({ ctx }: { ctx: Ctx }) {
  assertCan(ctx.actor, "tokens:manage");
  return ctx.db
    .select({ id: apiTokens.id, name: apiTokens.name, prefix: apiTokens.prefix, userName: users.name, userEmail: users.email, createdAt: apiTokens.createdAt, lastUsedAt: apiTokens.lastUsedAt, revokedAt: apiTokens.revokedAt })
    .from(apiTokens)
    .innerJoin(users, eq(users.id, apiTokens.userId))
    .where(eq(apiTokens.labId, ctx.actor.labId))
    .orderBy(desc(apiTokens.createdAt));
}
