import "server-only";
import { and, eq } from "drizzle-orm";
import { memberships } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import { recordAudit } from "../audit";
import type { Ctx } from "@/lib/base/context";
import { conflict, notFound } from "@/lib/base/errors";
import { isUuid } from "../samples/getSample";
import { ownersLeft } from "./shared";

export async function removeMember({ ctx, input }: { ctx: Ctx; input: { membershipId: string } }) {
  assertCan(ctx.actor, "members:manage");
  if (!isUuid(input.membershipId)) throw notFound("member");
  const [m] = await ctx.db.select().from(memberships).where(and(eq(memberships.id, input.membershipId), eq(memberships.labId, ctx.actor.labId)));
  if (!m) throw notFound("member");
  if (m.role === "owner" && (await ownersLeft(ctx, m.id)) === 0) throw conflict("A lab needs at least one owner: make someone else owner first.");
  await ctx.db.delete(memberships).where(eq(memberships.id, m.id));
  await recordAudit(ctx, "member.remove", { type: "membership", id: m.id }, { userId: m.userId });
}
