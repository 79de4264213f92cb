import { index, jsonb, pgTable, text, uuid } from "drizzle-orm/pg-core";
import { labs, users } from "./auth";
import { createdAt, id } from "./columns";

/** Who did what in a lab; written by the services, read in lab settings. */
export const auditEvents = pgTable(
  "audit_events",
  {
    id: id(),
    labId: uuid("lab_id").notNull().references(() => labs.id, { onDelete: "cascade" }),
    actorId: uuid("actor_id").references(() => users.id, { onDelete: "set null" }),
    /** "token" or "session" */
    via: text("via").notNull(),
    action: text("action").notNull(),
    targetType: text("target_type").notNull(),
    targetId: text("target_id"),
    data: jsonb("data").$type<Record<string, unknown>>().notNull().default({}),
    createdAt: createdAt(),
  },
  (t) => [index("audit_events_lab_idx").on(t.labId, t.createdAt)],
);
