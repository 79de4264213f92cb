import { NextResponse } from "next/server";
import { apiRoute } from "@/lib/http/respond";
import { getSampleVersions } from "@/lib/services/analysis/getSampleVersions";

/**
 * The sample's current extraction-settings and field-model versions and its latest re-analysis run (with progress:
 * status queued, running, fitting, done or failed with a message), and the sessions and tips whose I(z) curves
 * a field model may take κ from, with their fitted curves one by one.
 */
export const GET = apiRoute<{ id: string }>(async ({ ctx, params }) => {
  const { settings, field, run, curveChoices, fittedCurves } = await getSampleVersions({ ctx, input: { sampleId: params.id } });
  return NextResponse.json({
    settings: {
      id: settings.id,
      version: settings.version,
      settings: settings.settings,
      createdAt: settings.createdAt.toISOString(),
    },
    fieldModel: { id: field.id, version: field.version, model: field.model, createdAt: field.createdAt.toISOString() },
    run: run
      ? {
          id: run.id,
          status: run.status,
          total: run.total,
          done: run.done,
          reason: run.reason,
          message: run.message,
          updatedAt: run.updatedAt.toISOString(),
        }
      : null,
    /** Sessions and tips of the sample with fitted I(z) curves (scope, id, label, curves, κ): choices for the field model. */
    curveChoices,
    /** The sample's fitted I(z) curves one by one (id, label, κ, flags): a set chosen by hand (curveScope "set"). */
    fittedCurves,
  });
});
