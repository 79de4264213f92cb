import "server-only";
import { and, desc, eq, sql } from "drizzle-orm";
import { analysisRuns, extractionSettingsVersions, fieldModelVersions } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import { enqueueReanalyzeSample, enqueueRefitSample } from "@/lib/jobs/queue";
import { fieldModelInput } from "@/lib/schemas/uploads";
import { extractionSettingsSchema, resolveExtractionSettings } from "@/lib/spectra";
import { recordAudit } from "../audit";
import type { Ctx } from "@/lib/base/context";
import { invalid } from "@/lib/base/errors";
import { parseInput } from "../parse";
import { getSample } from "../samples/getSample";

/** Queues a background re-analysis of a sample (fields and automatic picks), with a run to show its progress. */
export async function queueReanalysis({ ctx, input }: { ctx: Ctx; input: { sampleId: string; reason: string } }) {
  const { sampleId, reason } = input;
  const [run] = await ctx.db.insert(analysisRuns).values({ labId: ctx.actor.labId, sampleId, reason, createdBy: ctx.actor.userId }).returning();
  await enqueueReanalyzeSample({ sampleId, labId: ctx.actor.labId, reason });
  return run;
}

/** Queues a background refit of a sample from its stored picks, with a run to show its progress. */
export async function queueRefit({ ctx, input }: { ctx: Ctx; input: { sampleId: string; reason: string } }) {
  const { sampleId, reason } = input;
  const [run] = await ctx.db.insert(analysisRuns).values({ labId: ctx.actor.labId, sampleId, reason, createdBy: ctx.actor.userId }).returning();
  await enqueueRefitSample({ sampleId, labId: ctx.actor.labId, runId: run.id, reason });
  return run;
}

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

/** Saves a new field-model version (contact distance, decay-constant source, screening) and re-estimates every field. */
export async function saveFieldModel({ ctx, input }: { ctx: Ctx; input: { sampleId: string; model: unknown } }) {
  assertCan(ctx.actor, "analysis:write");
  const sample = await getSample({ ctx, input: { id: input.sampleId } });
  const m = parseInput(fieldModelInput, input.model);
  const stored = {
    contactDistance_nm: m.contactDistance_nm,
    contactDistanceSigma_nm: m.contactDistanceSigma_nm,
    decayConstantSource: m.decayConstantSource,
    barrierHeight_eV: m.decayConstantSource === "measured" ? (m.barrierHeight_eV ?? null) : null,
    screening: m.screening,
  };
  const version = await ctx.db.transaction(async (tx) => {
    const [{ next }] = await tx.select({ next: sql<number>`coalesce(max(${fieldModelVersions.version}), 0) + 1` }).from(fieldModelVersions).where(eq(fieldModelVersions.sampleId, sample.id));
    const [row] = await tx.insert(fieldModelVersions).values({ labId: ctx.actor.labId, sampleId: sample.id, version: next, model: stored, note: m.note ?? null, createdBy: ctx.actor.userId }).returning();
    return row;
  });
  await recordAudit(ctx, "settings.field-model", { type: "sample", id: sample.id }, { version: version.version });
  const run = await queueReanalysis({ ctx, input: { sampleId: sample.id, reason: `field model v${version.version}` } });
  return { id: version.id, version: version.version, model: stored, runId: run.id, createdAt: version.createdAt.toISOString() };
}

export async function getSampleVersions({ ctx, input }: { ctx: Ctx; input: { sampleId: string } }) {
  assertCan(ctx.actor, "lab:read");
  const sample = await getSample({ ctx, input: { id: input.sampleId } });
  const [settings] = await ctx.db.select().from(extractionSettingsVersions).where(eq(extractionSettingsVersions.sampleId, sample.id)).orderBy(desc(extractionSettingsVersions.version)).limit(1);
  const [field] = await ctx.db.select().from(fieldModelVersions).where(eq(fieldModelVersions.sampleId, sample.id)).orderBy(desc(fieldModelVersions.version)).limit(1);
  const [run] = await ctx.db.select().from(analysisRuns).where(and(eq(analysisRuns.sampleId, sample.id))).orderBy(desc(analysisRuns.createdAt)).limit(1);
  return { settings, field, run: run ?? null };
}
