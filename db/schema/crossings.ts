import { sql } from "drizzle-orm";
import { boolean, doublePrecision, index, integer, jsonb, pgEnum, pgTable, text, timestamp, uniqueIndex, uuid } from "drizzle-orm/pg-core";
import { labs, users } from "./auth";
import { createdAt, id } from "./columns";
import { samples } from "./lab";
import { extractionSettingsVersions, fieldModelVersions } from "./spectra";

export const crossingState = pgEnum("crossing_state", ["crossed", "closing", "none"]);
export type CrossingState = (typeof crossingState.enumValues)[number];

/** A fit of gap versus field for a sample (optionally one region). The newest row per (sample, region) is current. */
export const crossings = pgTable(
  "crossings",
  {
    id: id(),
    labId: uuid("lab_id").notNull().references(() => labs.id, { onDelete: "cascade" }),
    sampleId: uuid("sample_id").notNull().references(() => samples.id, { onDelete: "cascade" }),
    /** null: every region together. */
    region: text("region"),
    state: crossingState("state").notNull(),
    found: boolean("found").notNull(),
    fieldVPerNm: doublePrecision("field_v_per_nm"),
    ci95LoVPerNm: doublePrecision("ci95_lo_v_per_nm"),
    ci95HiVPerNm: doublePrecision("ci95_hi_v_per_nm"),
    slopeBelowEvPerVPerNm: doublePrecision("slope_below_ev_per_v_per_nm"),
    slopeAboveEvPerVPerNm: doublePrecision("slope_above_ev_per_v_per_nm"),
    extrapolatedVPerNm: doublePrecision("extrapolated_v_per_nm"),
    nPoints: integer("n_points").notNull(),
    comparison: jsonb("comparison").$type<Record<string, unknown>>().notNull(),
    curve: jsonb("curve").$type<{ field: number[]; gap: number[]; lo: number[]; hi: number[] }>(),
    settingsVersionId: uuid("settings_version_id").references(() => extractionSettingsVersions.id, { onDelete: "set null" }),
    fieldModelVersionId: uuid("field_model_version_id").references(() => fieldModelVersions.id, { onDelete: "set null" }),
    /** "candidate" until an analyst confirms it. */
    status: text("status").notNull().default("candidate"),
    confirmedBy: uuid("confirmed_by").references(() => users.id, { onDelete: "set null" }),
    confirmedAt: timestamp("confirmed_at", { withTimezone: true }),
    createdAt: createdAt(),
  },
  (t) => [index("crossings_sample_idx").on(t.sampleId, t.createdAt)],
);
export type Crossing = typeof crossings.$inferSelect;

/** Events worth telling people about: first found, moved outside the earlier 95% interval, confirmed. */
export const crossingEvents = pgTable(
  "crossing_events",
  {
    id: id(),
    labId: uuid("lab_id").notNull().references(() => labs.id, { onDelete: "cascade" }),
    sampleId: uuid("sample_id").notNull().references(() => samples.id, { onDelete: "cascade" }),
    crossingId: uuid("crossing_id").notNull().references(() => crossings.id, { onDelete: "cascade" }),
    /** found | moved | confirmed */
    kind: text("kind").notNull(),
    fieldVPerNm: doublePrecision("field_v_per_nm").notNull(),
    ci95LoVPerNm: doublePrecision("ci95_lo_v_per_nm"),
    ci95HiVPerNm: doublePrecision("ci95_hi_v_per_nm"),
    data: jsonb("data").$type<Record<string, unknown>>().notNull().default({}),
    createdAt: createdAt(),
  },
  (t) => [
    index("crossing_events_sample_idx").on(t.sampleId, t.createdAt),
    // One event of a kind per crossing row: a second decision about the same fit is a no-op even if
    // the row lock in lib/services/alerts/recordEvent.ts were ever bypassed.
    uniqueIndex("crossing_events_crossing_kind_unique").on(t.crossingId, t.kind),
  ],
);
export type CrossingEvent = typeof crossingEvents.$inferSelect;
export type CrossingEventKind = "found" | "moved" | "confirmed";

export const subscriptions = pgTable(
  "subscriptions",
  {
    id: id(),
    labId: uuid("lab_id").notNull().references(() => labs.id, { onDelete: "cascade" }),
    sampleId: uuid("sample_id").notNull().references(() => samples.id, { onDelete: "cascade" }),
    userId: uuid("user_id").notNull().references(() => users.id, { onDelete: "cascade" }),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("subscriptions_sample_user_unique").on(t.sampleId, t.userId)],
);
export type Subscription = typeof subscriptions.$inferSelect;

export const notifications = pgTable(
  "notifications",
  {
    id: id(),
    labId: uuid("lab_id").notNull().references(() => labs.id, { onDelete: "cascade" }),
    userId: uuid("user_id").notNull().references(() => users.id, { onDelete: "cascade" }),
    eventId: uuid("event_id").references(() => crossingEvents.id, { onDelete: "cascade" }),
    title: text("title").notNull(),
    body: text("body").notNull(),
    href: text("href"),
    readAt: timestamp("read_at", { withTimezone: true }),
    createdAt: createdAt(),
  },
  (t) => [
    index("notifications_user_idx").on(t.userId, t.createdAt),
    uniqueIndex("notifications_event_user_unique").on(t.eventId, t.userId),
    // The unread count in the lab navigation, read on every page.
    index("notifications_unread_idx").on(t.userId, t.labId).where(sql`${t.readAt} is null`),
  ],
);
export type Notification = typeof notifications.$inferSelect;

/** Every e-mail the product sent, keyed so a retried job never sends twice. */
export const mailLog = pgTable(
  "mail_log",
  {
    id: id(),
    labId: uuid("lab_id").references(() => labs.id, { onDelete: "cascade" }),
    idempotencyKey: text("idempotency_key").notNull(),
    to: text("to").notNull(),
    subject: text("subject").notNull(),
    providerId: text("provider_id"),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("mail_log_key_unique").on(t.idempotencyKey)],
);
