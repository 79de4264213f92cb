import "server-only";
import { eq } from "drizzle-orm";
import { labs, type FlaggedInFit } from "@/db/schema";
import type { Ctx } from "@/lib/base/context";

/** The actor's lab's setting for flagged spectra in the critical-field fit. */
export async function labFlaggedInFit({ ctx }: { ctx: Ctx }): Promise<FlaggedInFit> {
  const [lab] = await ctx.db.select({ v: labs.flaggedInFit }).from(labs).where(eq(labs.id, ctx.actor.labId));
  return lab?.v ?? "include";
}
