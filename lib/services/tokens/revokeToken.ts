import "server-only";
import { and, eq, isNull } from "drizzle-orm";
import { apiTokens } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import { recordAudit } from "../audit";
import type { Ctx } from "@/lib/base/context";
import { notFound } from "@/lib/base/errors";
import { isUuid } from "../samples/getSample";

export async function revokeToken({ ctx, input }: { ctx: Ctx; input: { id: string } }) {
  assertCan(ctx.actor, "tokens:manage");
  if (!isUuid(input.id)) throw notFound("token");
  const [row] = await ctx.db
    .update(apiTokens)
    .set({ revokedAt: new Date() })
    .where(and(eq(apiTokens.id, input.id), eq(apiTokens.labId, ctx.actor.labId), isNull(apiTokens.revokedAt)))
    .returning({ id: apiTokens.id });
  if (!row) throw notFound("token");
  await recordAudit(ctx, "token.revoke", { type: "api_token", id: row.id });
}
