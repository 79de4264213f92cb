import { index, integer, pgEnum, pgTable, text, timestamp, uniqueIndex, uuid, doublePrecision } from "drizzle-orm/pg-core";
import { createdAt, id } from "./columns";

export const memberRole = pgEnum("member_role", ["owner", "microscopist", "analyst", "collaborator"]);
export type MemberRole = (typeof memberRole.enumValues)[number];

export const users = pgTable(
  "users",
  {
    id: id(),
    email: text("email").notNull(),
    name: text("name").notNull(),
    /** bcrypt hash; null until an invited person sets a password. */
    passwordHash: text("password_hash"),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("users_email_unique").on(t.email)],
);
export type User = typeof users.$inferSelect;
export type NewUser = typeof users.$inferInsert;

/** Whether spectra whose automatic pick carries a quality flag enter the critical-field fit. */
export const flaggedInFit = pgEnum("flagged_in_fit", ["include", "exclude"]);
export type FlaggedInFit = (typeof flaggedInFit.enumValues)[number];

export const labs = pgTable(
  "labs",
  {
    id: id(),
    slug: text("slug").notNull(),
    name: text("name").notNull(),
    institution: text("institution"),
    /** Lab defaults used when a new tip or sample is created without its own value. */
    defaultTipWorkFunctionEv: doublePrecision("default_tip_work_function_ev").notNull().default(4.5),
    defaultTipWorkFunctionSigmaEv: doublePrecision("default_tip_work_function_sigma_ev").notNull().default(0.1),
    defaultSampleWorkFunctionEv: doublePrecision("default_sample_work_function_ev").notNull().default(4.5),
    defaultSampleWorkFunctionSigmaEv: doublePrecision("default_sample_work_function_sigma_ev").notNull().default(0.1),
    /** Flagged automatic picks in the crossing fit: `include` (marked on the plot) or `exclude`; corrected picks always enter. */
    flaggedInFit: flaggedInFit("flagged_in_fit").notNull().default("include"),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("labs_slug_unique").on(t.slug)],
);
export type Lab = typeof labs.$inferSelect;

export const memberships = pgTable(
  "memberships",
  {
    id: id(),
    labId: uuid("lab_id").notNull().references(() => labs.id, { onDelete: "cascade" }),
    userId: uuid("user_id").notNull().references(() => users.id, { onDelete: "cascade" }),
    role: memberRole("role").notNull(),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("memberships_lab_user_unique").on(t.labId, t.userId), index("memberships_user_idx").on(t.userId)],
);
export type Membership = typeof memberships.$inferSelect;

export const invitations = pgTable(
  "invitations",
  {
    id: id(),
    labId: uuid("lab_id").notNull().references(() => labs.id, { onDelete: "cascade" }),
    email: text("email").notNull(),
    role: memberRole("role").notNull(),
    /** SHA-256 of the secret in the invitation link; the secret itself is only ever in the e-mail. */
    tokenHash: text("token_hash").notNull(),
    invitedBy: uuid("invited_by").references(() => users.id, { onDelete: "set null" }),
    expiresAt: timestamp("expires_at", { withTimezone: true }).notNull(),
    acceptedAt: timestamp("accepted_at", { withTimezone: true }),
    revokedAt: timestamp("revoked_at", { withTimezone: true }),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("invitations_token_hash_unique").on(t.tokenHash), index("invitations_lab_idx").on(t.labId)],
);
export type Invitation = typeof invitations.$inferSelect;

export const apiTokens = pgTable(
  "api_tokens",
  {
    id: id(),
    labId: uuid("lab_id").notNull().references(() => labs.id, { onDelete: "cascade" }),
    /** The member the token acts as; it carries that member's role at the time of each request. */
    userId: uuid("user_id").notNull().references(() => users.id, { onDelete: "cascade" }),
    name: text("name").notNull(),
    /** SHA-256 of the token; the token is shown once at creation and never stored. */
    tokenHash: text("token_hash").notNull(),
    /** First characters of the token, to recognise it in lists. */
    prefix: text("prefix").notNull(),
    createdBy: uuid("created_by").references(() => users.id, { onDelete: "set null" }),
    lastUsedAt: timestamp("last_used_at", { withTimezone: true }),
    revokedAt: timestamp("revoked_at", { withTimezone: true }),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("api_tokens_hash_unique").on(t.tokenHash), index("api_tokens_lab_idx").on(t.labId)],
);
export type ApiToken = typeof apiTokens.$inferSelect;

/**
 * Failed sign-ins in a row per key (`account:`, `client:`, `device:`, lib/auth/throttle.ts) and
 * the time before which the key lets no try through; shared by every app process.
 */
export const signInThrottle = pgTable("sign_in_throttle", {
  key: text("key").primaryKey(),
  /** When this run of failures began. */
  windowStart: timestamp("window_start", { withTimezone: true }).notNull(),
  failures: integer("failures").notNull().default(0),
  blockedUntil: timestamp("blocked_until", { withTimezone: true }).notNull().defaultNow(),
});

/**
 * One-time codes that guard `/setup`, the creation of a group's first own lab (one that is not the
 * demo lab, slug `demo`). Each start of the local stack issues a fresh code while no own lab exists
 * and drops the unused older ones; only the SHA-256 of a code is kept. A used code records its lab.
 */
export const setupCodes = pgTable(
  "setup_codes",
  {
    id: id(),
    codeHash: text("code_hash").notNull(),
    usedAt: timestamp("used_at", { withTimezone: true }),
    labId: uuid("lab_id").references(() => labs.id, { onDelete: "set null" }),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("setup_codes_hash_unique").on(t.codeHash)],
);

/**
 * Signed-in browsers (lib/auth/sessions.ts): the session cookie carries a row's id, checked on every
 * request, so signing out, removal from a lab or a new password ends a session on the server.
 */
export const authSessions = pgTable(
  "auth_sessions",
  {
    id: id(),
    userId: uuid("user_id").notNull().references(() => users.id, { onDelete: "cascade" }),
    createdAt: createdAt(),
    endedAt: timestamp("ended_at", { withTimezone: true }),
    /** "signed out", "removed from a lab", "password changed". */
    endedReason: text("ended_reason"),
  },
  (t) => [index("auth_sessions_user_idx").on(t.userId)],
);
