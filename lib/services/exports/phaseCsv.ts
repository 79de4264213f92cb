import "server-only";
import { and, asc, eq } from "drizzle-orm";
import { extractionSettingsVersions, fieldModelVersions, gapPicks, spectra, tips } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import type { Ctx } from "@/lib/base/context";
import { getSample } from "../samples/getSample";
import { flaggedOutOfFit } from "../analysis/shared";
import { labFlaggedInFit } from "../spectra/labFlaggedInFit";
import { fileStem } from "@/lib/format";
import { csv } from "./csv";

/** Quality-flag codes of a pick for one CSV cell, `;`-separated; empty when none. */
export function flagCodes(flags: readonly { code: string }[] | null | undefined): string {
  return (flags ?? []).map((f) => f.code).join(";");
}

/**
 * Every point of the phase plot with what made it: field model and settings versions, raw-file
 * hash, and the pick's quality flags (codes, their messages, and whether the lab's setting left
 * the spectrum out of the fit for them).
 */
export async function phaseCsv({ ctx, input }: { ctx: Ctx; input: { sampleId: string } }) {
  assertCan(ctx.actor, "lab:read");
  const sample = await getSample({ ctx, input: { id: input.sampleId } });
  const rows = await ctx.db
    .select({ s: spectra, p: gapPicks, sv: extractionSettingsVersions.version, fv: fieldModelVersions.version, tip: tips.label })
    .from(spectra)
    .leftJoin(gapPicks, eq(gapPicks.spectrumId, spectra.id))
    .leftJoin(extractionSettingsVersions, eq(extractionSettingsVersions.id, gapPicks.settingsVersionId))
    .leftJoin(fieldModelVersions, eq(fieldModelVersions.id, spectra.fieldModelVersionId))
    .leftJoin(tips, eq(tips.id, spectra.tipId))
    .where(and(eq(spectra.sampleId, sample.id), eq(spectra.labId, ctx.actor.labId)))
    .orderBy(asc(spectra.fieldVPerNm), asc(spectra.sourceName), asc(spectra.indexInFile));
  const header = [
    "spectrum_id", "source_file", "index_in_file", "label", "raw_sha256", "region", "tip",
    "setpoint_bias_V", "setpoint_current_A", "z_offset_pm", "temperature_K", "lockin_modulation_mV_rms",
    "distance_nm", "distance_sigma_nm", "field_V_per_nm", "field_sigma_V_per_nm",
    "pick_status", "vb_edge_V", "cb_edge_V", "gap_eV", "gap_sigma_eV", "closed_within_resolution", "resolution_meV",
    "pick_source", "pick_method", "excluded", "excluded_reason", "extraction_settings_version", "field_model_version",
    "flags", "flag_messages", "excluded_by_flag",
  ];
  const setting = await labFlaggedInFit({ ctx });
  const body = rows.map(({ s, p, sv, fv, tip }) => [
    s.id, s.sourceName, s.indexInFile, s.label, s.rawSha256, s.region, tip,
    s.setpointBiasV, s.setpointCurrentA, s.zOffsetPm, s.temperatureK, s.lockinModulationMvRms,
    s.distanceNm, s.distanceSigmaNm, s.fieldVPerNm, s.fieldSigmaVPerNm,
    p?.status, p?.vbEdgeV, p?.cbEdgeV, p?.gapEv, p?.uncertaintyEv, p?.closed, p?.resolutionMev,
    p?.source, p?.method, p?.excluded, p?.excludedReason, sv, fv,
    flagCodes(p?.flags), p?.flags.map((f) => f.message).join("; "), p ? flaggedOutOfFit(setting, p) : null,
  ]);
  return { fileName: `${fileStem(sample.name)}-phase.csv`, text: csv(header, body) };
}
