import { date, doublePrecision, index, pgTable, text, uniqueIndex, uuid } from "drizzle-orm/pg-core";
import { labs, users } from "./auth";
import { createdAt, id, updatedAt } from "./columns";

export const samples = pgTable(
  "samples",
  {
    id: id(),
    labId: uuid("lab_id").notNull().references(() => labs.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    material: text("material").notNull(),
    substrate: text("substrate"),
    workFunctionEv: doublePrecision("work_function_ev").notNull(),
    workFunctionSigmaEv: doublePrecision("work_function_sigma_ev").notNull(),
    notes: text("notes"),
    createdBy: uuid("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [uniqueIndex("samples_lab_name_unique").on(t.labId, t.name)],
);
export type Sample = typeof samples.$inferSelect;
export type NewSample = typeof samples.$inferInsert;

export const tips = pgTable(
  "tips",
  {
    id: id(),
    labId: uuid("lab_id").notNull().references(() => labs.id, { onDelete: "cascade" }),
    label: text("label").notNull(),
    material: text("material").notNull(),
    workFunctionEv: doublePrecision("work_function_ev").notNull(),
    workFunctionSigmaEv: doublePrecision("work_function_sigma_ev").notNull(),
    preparedOn: date("prepared_on"),
    notes: text("notes"),
    createdBy: uuid("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [uniqueIndex("tips_lab_label_unique").on(t.labId, t.label)],
);
export type Tip = typeof tips.$inferSelect;

/** One measurement session at the instrument (named so to stay clear of sign-in sessions). */
export const measurementSessions = pgTable(
  "measurement_sessions",
  {
    id: id(),
    labId: uuid("lab_id").notNull().references(() => labs.id, { onDelete: "cascade" }),
    sampleId: uuid("sample_id").notNull().references(() => samples.id, { onDelete: "restrict" }),
    tipId: uuid("tip_id").references(() => tips.id, { onDelete: "set null" }),
    label: text("label").notNull(),
    date: date("date").notNull(),
    instrument: text("instrument"),
    temperatureK: doublePrecision("temperature_k"),
    operatorId: uuid("operator_id").references(() => users.id, { onDelete: "set null" }),
    notes: text("notes"),
    createdBy: uuid("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
    updatedAt: updatedAt(),
  },
  (t) => [index("measurement_sessions_lab_idx").on(t.labId), index("measurement_sessions_sample_idx").on(t.sampleId)],
);
export type MeasurementSession = typeof measurementSessions.$inferSelect;

/** Collaborators limited to chosen samples: when a collaborator has any row here, they see only those samples. */
export const sampleAccess = pgTable(
  "sample_access",
  {
    id: id(),
    labId: uuid("lab_id").notNull().references(() => labs.id, { onDelete: "cascade" }),
    sampleId: uuid("sample_id").notNull().references(() => samples.id, { onDelete: "cascade" }),
    userId: uuid("user_id").notNull().references(() => users.id, { onDelete: "cascade" }),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("sample_access_unique").on(t.sampleId, t.userId)],
);
