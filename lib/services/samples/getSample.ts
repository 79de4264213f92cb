import "server-only";
import { and, eq } from "drizzle-orm";
import { samples } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import type { Ctx } from "@/lib/base/context";
import { notFound } from "@/lib/base/errors";
import { sampleVisibility } from "./visibility";

export async function getSample({ ctx, input }: { ctx: Ctx; input: { id: string } }) {
  assertCan(ctx.actor, "lab:read");
  if (!isUuid(input.id)) throw notFound("sample");
  const [row] = await ctx.db
    .select()
    .from(samples)
    .where(and(eq(samples.id, input.id), await sampleVisibility(ctx)));
  if (!row) throw notFound("sample");
  return row;
}

export function isUuid(value: string): boolean {
  return /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i.test(value);
}
