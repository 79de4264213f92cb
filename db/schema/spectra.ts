import {
  bigint,
  boolean,
  doublePrecision,
  index,
  integer,
  jsonb,
  pgEnum,
  pgTable,
  text,
  uniqueIndex,
  uuid,
} from "drizzle-orm/pg-core";
import type { QualityFlag } from "@/lib/spectra/edges/flags";
import { labs, users } from "./auth";
import { createdAt, float64Array, id, updatedAt } from "./columns";
import { measurementSessions, samples, tips } from "./lab";

export const uploadStatus = pgEnum("upload_status", ["pending", "queued", "processing", "done", "failed"]);
export type UploadStatus = (typeof uploadStatus.enumValues)[number];

/** A raw file as uploaded. Its bytes live in object storage under `storage_key` and are never deleted by processing. */
export const uploads = pgTable(
  "uploads",
  {
    id: id(),
    labId: uuid("lab_id").notNull().references(() => labs.id, { onDelete: "cascade" }),
    sessionId: uuid("session_id").notNull().references(() => measurementSessions.id, { onDelete: "restrict" }),
    fileName: text("file_name").notNull(),
    sizeBytes: bigint("size_bytes", { mode: "number" }).notNull(),
    sha256: text("sha256").notNull(),
    storageKey: text("storage_key").notNull(),
    status: uploadStatus("status").notNull().default("pending"),
    message: text("message"),
    /**
     * For a failed file: whether processing it again can help (the queue gave up on an error of
     * the services); false when the file itself cannot be read, which a retry reads the same way.
     */
    retryable: boolean("retryable").notNull().default(false),
    /**
     * The bytes in storage did not match the declared SHA-256 (a damaged transfer or storage
     * fault): the row holds no file, so the genuine file may be sent again under it.
     */
    hashMismatch: boolean("hash_mismatch").notNull().default(false),
    spectraCount: integer("spectra_count").notNull().default(0),
    /** I(z) approach curves stored from the file (approach_curves). */
    curvesCount: integer("curves_count").notNull().default(0),
    warnings: jsonb("warnings").$type<string[]>().notNull().default([]),
    attempts: integer("attempts").notNull().default(0),
    createdBy: uuid("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [uniqueIndex("uploads_lab_sha256_unique").on(t.labId, t.sha256), index("uploads_session_idx").on(t.sessionId)],
);
export type Upload = typeof uploads.$inferSelect;

/** Versioned extraction settings of a sample: every pick names the version that made it. */
export const extractionSettingsVersions = pgTable(
  "extraction_settings_versions",
  {
    id: id(),
    labId: uuid("lab_id").notNull().references(() => labs.id, { onDelete: "cascade" }),
    sampleId: uuid("sample_id").notNull().references(() => samples.id, { onDelete: "cascade" }),
    version: integer("version").notNull(),
    settings: jsonb("settings").$type<Record<string, unknown>>().notNull(),
    note: text("note"),
    createdBy: uuid("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("extraction_settings_sample_version_unique").on(t.sampleId, t.version)],
);
export type ExtractionSettingsVersion = typeof extractionSettingsVersions.$inferSelect;

/** Versioned field model of a sample (contact distance, decay-constant source, screening; work functions from tip and sample). */
/** The stored part of a field model version: the work functions come from the sample and each spectrum's tip. */
export interface StoredFieldModel {
  contactDistance_nm: number;
  contactDistanceSigma_nm: number;
  /** Where κ comes from: the work functions' mean, a barrier typed in, or I(z) curves. */
  decayConstantSource?: "mean-work-function" | "measured" | "curves";
  /** Measured apparent barrier height, eV; null = mean of the two work functions. */
  barrierHeight_eV: number | null;
  /** Its standard uncertainty, eV (from the curves' κ); absent or 0 when typed in without one. */
  barrierHeightSigma_eV?: number;
  /**
   * Without a measured barrier, the σ of the work-function-mean assumption, eV; absent in versions
   * saved before it existed, which were estimated with none (0).
   */
  assumedBarrierSigma_eV?: number;
  /** With κ from I(z) curves: which curves, chosen how, and their weighted κ. */
  curves?: StoredCurveChoice | null;
  screening: number;
}

/** The I(z) curves a field model version took κ from. */
export interface StoredCurveChoice {
  /** One session's curves, one tip's (on this sample), or a chosen set. */
  scope: "session" | "tip" | "set";
  sessionId?: string | null;
  tipId?: string | null;
  curveIds: string[];
  kappa_per_nm: number;
  kappaSigma_per_nm: number;
  /** In words, for cards and notes: "6 I(z) curves of session 2026-11-20 (W-17)". */
  description: string;
}

export const fieldModelVersions = pgTable(
  "field_model_versions",
  {
    id: id(),
    labId: uuid("lab_id").notNull().references(() => labs.id, { onDelete: "cascade" }),
    sampleId: uuid("sample_id").notNull().references(() => samples.id, { onDelete: "cascade" }),
    version: integer("version").notNull(),
    model: jsonb("model").$type<Record<string, unknown>>().notNull(),
    note: text("note"),
    createdBy: uuid("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("field_model_sample_version_unique").on(t.sampleId, t.version)],
);
export type FieldModelVersion = typeof fieldModelVersions.$inferSelect;

export const spectrumKind = pgEnum("spectrum_kind", ["measured", "average"]);
export type SpectrumKind = (typeof spectrumKind.enumValues)[number];

/**
 * Where a measured series came from: its lab, upload, session, sample and tip, its place in the raw
 * file (and that file's SHA-256) and its length. Spectra and I(z) curves carry the same columns.
 */
export function fromUpload() {
  return {
    labId: uuid("lab_id").notNull().references(() => labs.id, { onDelete: "cascade" }),
    uploadId: uuid("upload_id").notNull().references(() => uploads.id, { onDelete: "restrict" }),
    sessionId: uuid("session_id").notNull().references(() => measurementSessions.id, { onDelete: "restrict" }),
    sampleId: uuid("sample_id").notNull().references(() => samples.id, { onDelete: "restrict" }),
    tipId: uuid("tip_id").references(() => tips.id, { onDelete: "set null" }),
    /** File name, or "archive.zip/entry.csv" for a zip entry. */
    sourceName: text("source_name").notNull(),
    indexInFile: integer("index_in_file").notNull(),
    label: text("label").notNull(),
    rawSha256: text("raw_sha256").notNull(),
    nPoints: integer("n_points").notNull(),
  };
}

/**
 * One dI/dV curve: parsed arrays and metadata, with the distance and field estimated for it. An
 * `average` is the mean of repeats at one point (its members in `spectrum_average_members`), with
 * the standard error of the mean per point in `stderr`; it takes its first member's upload, file
 * and raw hash, and a negative `index_in_file` (−1, −2 … within that file) so it never collides
 * with a measured column.
 */
export const spectra = pgTable(
  "spectra",
  {
    id: id(),
    ...fromUpload(),
    biasV: float64Array("bias_v").notNull(),
    didv: float64Array("didv").notNull(),
    currentA: float64Array("current_a"),
    setpointBiasV: doublePrecision("setpoint_bias_v"),
    setpointCurrentA: doublePrecision("setpoint_current_a"),
    zOffsetPm: doublePrecision("z_offset_pm"),
    lockinModulationMvRms: doublePrecision("lockin_modulation_mv_rms"),
    temperatureK: doublePrecision("temperature_k"),
    xNm: doublePrecision("x_nm"),
    yNm: doublePrecision("y_nm"),
    region: text("region"),
    meta: jsonb("meta").$type<Record<string, string>>().notNull().default({}),
    warnings: jsonb("warnings").$type<string[]>().notNull().default([]),
    distanceNm: doublePrecision("distance_nm"),
    distanceSigmaNm: doublePrecision("distance_sigma_nm"),
    fieldVPerNm: doublePrecision("field_v_per_nm"),
    fieldSigmaVPerNm: doublePrecision("field_sigma_v_per_nm"),
    fieldModelVersionId: uuid("field_model_version_id").references(() => fieldModelVersions.id, { onDelete: "set null" }),
    kind: spectrumKind("kind").notNull().default("measured"),
    /** Standard error of the mean per point (averages only). */
    stderr: float64Array("stderr"),
    createdBy: uuid("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [
    index("spectra_sample_idx").on(t.sampleId),
    index("spectra_session_idx").on(t.sessionId),
    index("spectra_upload_idx").on(t.uploadId),
    uniqueIndex("spectra_upload_index_unique").on(t.uploadId, t.sourceName, t.indexInFile),
  ],
);
export type Spectrum = typeof spectra.$inferSelect;

/**
 * The members of an average: each repeat it was made from, `used` or left out (`leftOutReason`, the
 * test's `statistic` against its `limit`), in the order they were given. A spectrum is a member of
 * one average at most; while it is, it stays out of the crossing fit (the average stands for it).
 * Deleting the average (undo) deletes these rows and the members come back.
 */
export const spectrumAverageMembers = pgTable(
  "spectrum_average_members",
  {
    averageId: uuid("average_id").notNull().references(() => spectra.id, { onDelete: "cascade" }),
    memberId: uuid("member_id").notNull().references(() => spectra.id, { onDelete: "cascade" }),
    labId: uuid("lab_id").notNull().references(() => labs.id, { onDelete: "cascade" }),
    position: integer("position").notNull(),
    used: boolean("used").notNull(),
    leftOutReason: text("left_out_reason"),
    statistic: doublePrecision("statistic"),
    limit: doublePrecision("limit"),
    /** Put back by hand after the test left it out. */
    putBack: boolean("put_back").notNull().default(false),
  },
  (t) => [
    uniqueIndex("spectrum_average_members_member_unique").on(t.memberId),
    index("spectrum_average_members_average_idx").on(t.averageId),
  ],
);
export type SpectrumAverageMember = typeof spectrumAverageMembers.$inferSelect;

export const pickSource = pgEnum("pick_source", ["auto", "corrected"]);

/** The band edges of one spectrum. Corrections keep the automatic pick (`auto_pick`) and write `pick_history`. */
export const gapPicks = pgTable(
  "gap_picks",
  {
    id: id(),
    labId: uuid("lab_id").notNull().references(() => labs.id, { onDelete: "cascade" }),
    spectrumId: uuid("spectrum_id").notNull().references(() => spectra.id, { onDelete: "cascade" }),
    source: pickSource("source").notNull().default("auto"),
    /** "ok" (a gap) or "no-gap" (metallic). */
    status: text("status").notNull(),
    vbEdgeV: doublePrecision("vb_edge_v"),
    cbEdgeV: doublePrecision("cb_edge_v"),
    gapEv: doublePrecision("gap_ev"),
    midgapV: doublePrecision("midgap_v"),
    uncertaintyEv: doublePrecision("uncertainty_ev"),
    closed: boolean("closed").notNull().default(false),
    resolutionMev: doublePrecision("resolution_mev"),
    method: text("method").notNull(),
    settingsVersionId: uuid("settings_version_id").references(() => extractionSettingsVersions.id, { onDelete: "set null" }),
    /** The automatic pick as computed, kept when an analyst corrects it. */
    autoPick: jsonb("auto_pick").$type<Record<string, unknown>>().notNull(),
    /**
     * Quality flags of the automatic pick (lib/spectra/edges/flags.ts): reasons it may not be
     * trusted, made with the same settings version. They describe the data, so a correction keeps
     * them; a re-analysis replaces them with the new automatic pick's.
     */
    flags: jsonb("flags").$type<QualityFlag[]>().notNull().default([]),
    excluded: boolean("excluded").notNull().default(false),
    excludedReason: text("excluded_reason"),
    /** Optimistic-concurrency version, raised by every change. */
    version: integer("version").notNull().default(1),
    updatedBy: uuid("updated_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [uniqueIndex("gap_picks_spectrum_unique").on(t.spectrumId)],
);
export type GapPickRow = typeof gapPicks.$inferSelect;

export const pickHistory = pgTable(
  "pick_history",
  {
    id: id(),
    labId: uuid("lab_id").notNull().references(() => labs.id, { onDelete: "cascade" }),
    pickId: uuid("pick_id").notNull().references(() => gapPicks.id, { onDelete: "cascade" }),
    actorId: uuid("actor_id").references(() => users.id, { onDelete: "set null" }),
    /** correct | exclude | include | undo | reset | accept (the pick as it is, at `after.version`) */
    action: text("action").notNull(),
    before: jsonb("before").$type<Record<string, unknown>>().notNull(),
    after: jsonb("after").$type<Record<string, unknown>>().notNull(),
    reason: text("reason"),
    createdAt: createdAt(),
  },
  (t) => [index("pick_history_pick_idx").on(t.pickId)],
);

/** A background re-analysis of a sample (after its settings or field model changed), with its progress. */
export const analysisRuns = pgTable(
  "analysis_runs",
  {
    id: id(),
    labId: uuid("lab_id").notNull().references(() => labs.id, { onDelete: "cascade" }),
    sampleId: uuid("sample_id").notNull().references(() => samples.id, { onDelete: "cascade" }),
    reason: text("reason").notNull(),
    /** queued | running (spectra) | fitting (the refit after them) | done | failed */
    status: text("status").notNull().default("queued"),
    total: integer("total").notNull().default(0),
    done: integer("done").notNull().default(0),
    message: text("message"),
    createdBy: uuid("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [index("analysis_runs_sample_idx").on(t.sampleId, t.createdAt)],
);
