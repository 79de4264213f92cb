import { NextResponse } from "next/server";
import { z } from "zod";
import { text } from "@/lib/schemas/text";
import { apiRoute, readJson } from "@/lib/http/respond";
import { parseInput } from "@/lib/services/parse";
import { getSampleVersions } from "@/lib/services/analysis/getSampleVersions";
import { saveExtractionSettings } from "@/lib/services/analysis/saveExtractionSettings";

/**
 * Body: `{ settings: {...partial extraction settings}, note? }`; the settings are checked against the analysis core's
 * schema.
 */
const body = z.object({ settings: z.record(z.string(), z.unknown()), note: text().max(500).optional() });

export const GET = apiRoute<{ id: string }>(async ({ ctx, params }) => {
  const { settings } = await getSampleVersions({ ctx, input: { sampleId: params.id } });
  return NextResponse.json({
    id: settings.id,
    version: settings.version,
    settings: settings.settings,
    createdAt: settings.createdAt.toISOString(),
  });
});

export const PUT = apiRoute<{ id: string }>(async ({ ctx, request, params }) => {
  const b = parseInput(body, await readJson(request));
  return NextResponse.json(
    await saveExtractionSettings({ ctx, input: { sampleId: params.id, settings: b.settings, note: b.note } }),
  );
});
