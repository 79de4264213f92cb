import "server-only";
import { and, eq } from "drizzle-orm";
import { samples, spectra } from "@/db/schema";
import type { Ctx } from "@/lib/base/context";
import { notFound } from "@/lib/base/errors";
import { isUuid } from "../samples/getSample";
import { sampleVisibility } from "../samples/visibility";

/** A spectrum of the actor's lab and visible samples, with its kind and sample; "not found" otherwise. */
export async function spectrumKindOf(ctx: Ctx, id: string) {
  if (!isUuid(id)) throw notFound("spectrum");
  const visible = await sampleVisibility(ctx);
  const [row] = await ctx.db
    .select({ id: spectra.id, kind: spectra.kind, sampleId: spectra.sampleId })
    .from(spectra)
    .innerJoin(samples, eq(samples.id, spectra.sampleId))
    .where(and(eq(spectra.id, id), eq(spectra.labId, ctx.actor.labId), visible));
  if (!row) throw notFound("spectrum");
  return row;
}
