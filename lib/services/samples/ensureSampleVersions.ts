import "server-only";
import { extractionSettingsVersions, fieldModelVersions } from "@/db/schema";
import type { Ctx } from "@/lib/base/context";
import { initialVersionRows } from "./initialVersions";

/** Every sample starts with version 1 of its extraction settings and of its field model. */
export async function ensureSampleVersions({ ctx, input }: { ctx: Ctx; input: { sampleId: string } }): Promise<void> {
  const { sampleId } = input;
  const rows = initialVersionRows(ctx.actor.labId, sampleId, ctx.actor.userId);
  await ctx.db.insert(extractionSettingsVersions).values(rows.settings).onConflictDoNothing();
  await ctx.db.insert(fieldModelVersions).values(rows.field).onConflictDoNothing();
}
