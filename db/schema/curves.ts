import { doublePrecision, index, integer, jsonb, pgEnum, pgTable, text, uniqueIndex } from "drizzle-orm/pg-core";
import type { SweepFit } from "@/lib/spectra/barrier/fit";
import type { BarrierFlag } from "@/lib/spectra/barrier/flags";
import { createdAt, float64Array, id } from "./columns";
import { fromUpload } from "./spectra";

export const curveFitStatus = pgEnum("curve_fit_status", ["ok", "error"]);

/** One sweep of a curve's fit, as stored (lib/spectra/barrier SweepFit without its warnings and curvature). */
export type StoredSweep = Omit<SweepFit, "warnings" | "curvature">;

/**
 * One I(z) approach curve as read from an upload (z in nm, negative = closer; current in A; in
 * recorded order) with the fit of its decay constant κ (I ∝ exp(−2κz)) and apparent barrier
 * height. A curve that cannot be fitted is kept with `fit_status` error and the fit's message.
 */
export const approachCurves = pgTable(
  "approach_curves",
  {
    id: id(),
    ...fromUpload(),
    zNm: float64Array("z_nm").notNull(),
    currentA: float64Array("current_a").notNull(),
    setpointBiasV: doublePrecision("setpoint_bias_v"),
    setpointCurrentA: doublePrecision("setpoint_current_a"),
    temperatureK: doublePrecision("temperature_k"),
    meta: jsonb("meta").$type<Record<string, string>>().notNull().default({}),
    warnings: jsonb("warnings").$type<string[]>().notNull().default([]),
    fitStatus: curveFitStatus("fit_status").notNull(),
    fitMessage: text("fit_message"),
    kappaPerNm: doublePrecision("kappa_per_nm"),
    kappaSigmaPerNm: doublePrecision("kappa_sigma_per_nm"),
    barrierHeightEv: doublePrecision("barrier_height_ev"),
    barrierHeightSigmaEv: doublePrecision("barrier_height_sigma_ev"),
    pointsUsed: integer("points_used"),
    flags: jsonb("flags").$type<BarrierFlag[]>().notNull().default([]),
    sweeps: jsonb("sweeps").$type<StoredSweep[]>().notNull().default([]),
    /** Per point, an index into POINT_STATUS (used, floor, saturation, contact, outlier). */
    pointStatus: jsonb("point_status").$type<number[]>().notNull().default([]),
    createdAt: createdAt(),
  },
  (t) => [
    index("approach_curves_session_idx").on(t.sessionId),
    index("approach_curves_sample_idx").on(t.sampleId),
    uniqueIndex("approach_curves_upload_index_unique").on(t.uploadId, t.sourceName, t.indexInFile),
  ],
);
export type ApproachCurveRow = typeof approachCurves.$inferSelect;
