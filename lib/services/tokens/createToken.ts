import "server-only";
import { and, eq } from "drizzle-orm";
import { memberships } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import { tokenInput } from "@/lib/schemas/lab";
import { recordAudit } from "../audit";
import type { Ctx } from "@/lib/base/context";
import { notFound } from "@/lib/base/errors";
import { parseInput } from "../parse";
import { insertToken } from "./shared";

/** Creates a token acting as a member (default: the owner creating it). The token is returned once and never stored. */
export async function createToken({ ctx, input }: { ctx: Ctx; input: unknown }) {
  assertCan(ctx.actor, "tokens:manage");
  const data = parseInput(tokenInput, input);
  const userId = data.userId ?? ctx.actor.userId;
  const [member] = await ctx.db.select({ id: memberships.id }).from(memberships).where(and(eq(memberships.labId, ctx.actor.labId), eq(memberships.userId, userId)));
  if (!member) throw notFound("member");
  const result = await insertToken(ctx.db, ctx.actor.labId, userId, data.name, ctx.actor.userId);
  await recordAudit(ctx, "token.create", { type: "api_token", id: result.row.id }, { name: data.name, for: userId });
  return result;
}
