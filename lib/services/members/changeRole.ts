import "server-only";
import { and, eq } from "drizzle-orm";
import { memberships, type MemberRole } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import { memberRoleSchema } from "@/lib/schemas/lab";
import { recordAudit } from "../audit";
import type { Ctx } from "@/lib/base/context";
import { conflict, notFound } from "@/lib/base/errors";
import { parseInput } from "../parse";
import { isUuid } from "../samples/getSample";
import { ownersLeft } from "./shared";

export async function changeRole({ ctx, input }: { ctx: Ctx; input: { membershipId: string; role: unknown } }) {
  assertCan(ctx.actor, "members:manage");
  const role = parseInput(memberRoleSchema, input.role) as MemberRole;
  if (!isUuid(input.membershipId)) throw notFound("member");
  const [m] = await ctx.db.select().from(memberships).where(and(eq(memberships.id, input.membershipId), eq(memberships.labId, ctx.actor.labId)));
  if (!m) throw notFound("member");
  if (m.role === "owner" && role !== "owner" && (await ownersLeft(ctx, m.id)) === 0) {
    throw conflict("A lab needs at least one owner: make someone else owner first.");
  }
  const [row] = await ctx.db.update(memberships).set({ role }).where(eq(memberships.id, m.id)).returning();
  await recordAudit(ctx, "member.role", { type: "membership", id: m.id }, { from: m.role, to: role });
  return row;
}
