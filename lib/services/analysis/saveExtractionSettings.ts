import "server-only";
import { eq, sql } from "drizzle-orm";
import { extractionSettingsVersions } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import { extractionSettingsSchema, resolveExtractionSettings } from "@/lib/spectra";
import { recordAudit } from "../audit";
import type { Ctx } from "@/lib/base/context";
import { invalid } from "@/lib/base/errors";
import { getSample } from "../samples/getSample";
import { queueReanalysis } from "../runs/queueReanalysis";

/** Saves a new version of a sample's extraction settings and re-runs its automatic picks in the background. */
export async function saveExtractionSettings({ ctx, input }: { ctx: Ctx; input: { sampleId: string; settings: unknown; note?: string } }) {
  assertCan(ctx.actor, "analysis:write");
  const sample = await getSample({ ctx, input: { id: input.sampleId } });
  let settings;
  try {
    settings = resolveExtractionSettings(input.settings as never);
  } catch (e) {
    const issues = (e as { issues?: { path: (string | number)[]; message: string }[] }).issues ?? [];
    const fieldErrors = Object.fromEntries(issues.map((i) => [i.path.join("."), [i.message]]));
    throw invalid(issues[0] ? `${issues[0].path.join(".")}: ${issues[0].message}` : "Those settings are not valid.", fieldErrors);
  }
  extractionSettingsSchema.parse(settings);
  const version = await ctx.db.transaction(async (tx) => {
    const [{ next }] = await tx.select({ next: sql<number>`coalesce(max(${extractionSettingsVersions.version}), 0) + 1` }).from(extractionSettingsVersions).where(eq(extractionSettingsVersions.sampleId, sample.id));
    const [row] = await tx.insert(extractionSettingsVersions).values({ labId: ctx.actor.labId, sampleId: sample.id, version: next, settings: settings as unknown as Record<string, unknown>, note: input.note ?? null, createdBy: ctx.actor.userId }).returning();
    return row;
  });
  await recordAudit(ctx, "settings.extraction", { type: "sample", id: sample.id }, { version: version.version });
  const run = await queueReanalysis({ ctx, input: { sampleId: sample.id, reason: `extraction settings v${version.version}` } });
  return { version: version.version, id: version.id, settings, runId: run.id };
}
