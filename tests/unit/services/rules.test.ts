import fs from "node:fs";
import path from "node:path";
import { describe, expect, it } from "vitest";
import type { Crossing, CrossingEvent, MemberRole } from "@/db/schema";
import type { Ctx } from "@/lib/base/context";
import { isServiceError } from "@/lib/base/errors";
import { can, PERMISSIONS, ROLES, type Permission } from "@/lib/base/permissions";
import { decideEvent } from "@/lib/services/alerts/afterRefit";
import { flaggedOutOfFit } from "@/lib/services/analysis/shared";

/**
 * The rules the service verbs keep, without a database: who may call a verb (the role table,
 * checked before anything is read), when a refit is news (the alert decision), and which picks a
 * lab's flagged-spectra setting keeps out of the fit. Expected values come from the rules as
 * DEVELOPERS.md and the verbs' own comments state them.
 */

const SERVICES = path.join(process.cwd(), "lib/services");
const verbFiles = (dir = SERVICES): string[] =>
  fs.readdirSync(dir, { withFileTypes: true }).flatMap((e) => (e.isDirectory() ? verbFiles(path.join(dir, e.name)) : e.name.endsWith(".ts") ? [path.join(dir, e.name)] : []));

/** Verbs whose first statement is `assertCan(ctx.actor, "<permission>")`, with that permission. */
function guardedVerbs(): { file: string; name: string; permission: Permission }[] {
  return verbFiles().flatMap((file) => {
    const m = /export async function (\w+)\(\{ ctx\b[^\n]*\{\n\s*assertCan\(ctx\.actor, "([\w:]+)"\)/.exec(fs.readFileSync(file, "utf8"));
    return m ? [{ file, name: m[1], permission: m[2] as Permission }] : [];
  });
}

/** A database handle that fails the test's way if a verb reaches it: the check must come first. */
const untouchable = new Proxy({}, { get: () => { throw new Error("database touched"); } }); // prettier-ignore

const ctxAs = (role: MemberRole): Ctx => ({
  db: untouchable as Ctx["db"],
  actor: { userId: "u", email: "u@lab.example", name: "U", labId: "l", labSlug: "l", labName: "L", role, via: "session" },
});

/** Who may call what: each verb a person calls, by the permission it checks first (the role table, DEVELOPERS.md). */
const EXPECTED: Record<Permission, string[]> = {
  "lab:read": [
    ...["getSample", "getSampleVersions", "getSession", "getSpectrum", "getTip", "getUpload", "listMembers", "listNotifications", "listSamples"],
    ...["listSessionSpectra", "listSessionUploads", "listSessions", "listTips", "markNotificationsRead", "phaseCsv", "pickHistoryOf"],
    ...["spectraCsv", "tipsOfSample", "watchSample", "getStartSteps", "getSessionBarrier", "listTipKappas"],
  ],
  "sample:write": ["createSample", "updateSample"],
  "tip:write": ["createTip", "updateTip"],
  "session:write": ["createSession", "updateSession"],
  "upload:write": ["completeUpload", "createUploads", "retryUpload"],
  "spectrum:tag": ["tagSpectra", "createAverage", "undoAverage", "putBackMember"],
  "analysis:write": [
    ...["acceptPick", "confirmCrossing", "correctPick", "curvesForFieldModel", "saveExtractionSettings", "saveFieldModel"],
    ...["setExcluded", "undoPickChange"],
  ],
  "members:manage": ["changeRole", "inviteMember", "listSampleAccess", "removeMember", "revokeInvitation", "setSampleAccess"],
  "tokens:manage": ["createToken", "listTokens", "revokeToken"],
  "lab:configure": ["setFlaggedInFit", "updateLabDefaults"],
  "lab:create": ["createLab"],
};

describe("authorisation comes first in every verb", () => {
  const verbs = guardedVerbs();

  it("checks the permission the role table names for each verb, as its first statement", () => {
    const found: Record<string, string[]> = {};
    for (const v of verbs) (found[v.permission] ??= []).push(v.name);
    for (const names of Object.values(found)) names.sort();
    expect(found).toEqual(Object.fromEntries(Object.entries(EXPECTED).map(([p, names]) => [p, [...names].sort()])));
  });

  it("refuses each role the role table refuses, before the database is read, and lets the others past the check", async () => {
    const wrong: string[] = [];
    for (const v of verbs) {
      const fn = (await import(v.file))[v.name] as (a: { ctx: Ctx; input: unknown }) => Promise<unknown>;
      for (const role of ROLES) {
        const err = await fn({ ctx: ctxAs(role), input: {} }).then(
          () => null,
          (e: unknown) => e,
        );
        const refused = isServiceError(err) && err.code === "forbidden";
        if (refused === can(role, v.permission)) wrong.push(`${v.name} as ${role}: ${refused ? "refused" : `not refused (${String(err)})`}`);
      }
    }
    expect(wrong).toEqual([]);
  });

  it("gives collaborators reading only, and owners everything", () => {
    for (const p of Object.keys(PERMISSIONS) as Permission[]) {
      expect(can("owner", p)).toBe(true);
      // A lab of their own is the one thing a collaborator may start: it changes nothing in this lab.
      expect(can("collaborator", p)).toBe(p === "lab:read" || p === "lab:create");
    }
  });

  it("lets every member start a lab of their own", () => {
    for (const role of ROLES) expect(can(role, "lab:create")).toBe(true);
  });
});

describe("every service verb has the one shape", () => {
  // Helpers that verbs share take the verb's ctx first: a folder's shared.ts, the audit trail and
  // the sample-visibility filter. They are not verbs: nothing above the services calls them.
  const helpers = (file: string) => path.basename(file) === "shared.ts" || ["audit.ts", "samples/visibility.ts"].includes(path.relative(SERVICES, file));

  it("takes { ctx, input } (or { ctx }), one exported verb per file, named after it", () => {
    const wrong: string[] = [];
    for (const file of verbFiles().filter((f) => !helpers(f))) {
      const src = fs.readFileSync(file, "utf8");
      const exported = [...src.matchAll(/^export async function (\w+)\(([^)]*)/gm)];
      const verbs = exported.filter((m) => /^\{\s*ctx\b/.test(m[2]));
      for (const m of exported) if (!/^\{\s*ctx\b/.test(m[2])) wrong.push(`${path.relative(SERVICES, file)}: ${m[1]}(${m[2].slice(0, 30)}…)`);
      if (verbs.length > 1) wrong.push(`${path.relative(SERVICES, file)}: ${verbs.length} verbs`);
      if (verbs.length === 1 && verbs[0][1] !== path.basename(file, ".ts")) wrong.push(`${path.relative(SERVICES, file)}: holds ${verbs[0][1]}`);
    }
    expect(wrong).toEqual([]);
  });
});

const crossing = (over: Partial<Crossing> = {}): Crossing =>
  ({ id: "c1", sampleId: "s", labId: "l", state: "crossed", found: true, fieldVPerNm: 1.0, ci95LoVPerNm: 0.9, ci95HiVPerNm: 1.1, ...over }) as Crossing;
const event = (over: Partial<CrossingEvent> = {}): CrossingEvent =>
  ({ id: "e1", crossingId: "c0", kind: "found", fieldVPerNm: 1.0, ci95LoVPerNm: 0.9, ci95HiVPerNm: 1.1, ...over }) as CrossingEvent;

describe("the crossing alert decision (alerts/afterRefit.ts)", () => {
  it("tells of a first crossed fit once, as found", () => {
    expect(decideEvent(crossing(), null)).toBe("found");
    expect(decideEvent(crossing({ id: "c0" }), event())).toBeNull();
  });

  it("is silent for a fit that does not cross, or crosses without a field", () => {
    expect(decideEvent(crossing({ state: "closing" }), null)).toBeNull();
    expect(decideEvent(crossing({ found: false }), null)).toBeNull();
    expect(decideEvent(crossing({ fieldVPerNm: null }), null)).toBeNull();
    expect(decideEvent(null, null)).toBeNull();
  });

  it("tells of a move only outside the last event's 95% interval", () => {
    expect(decideEvent(crossing({ fieldVPerNm: 1.2 }), event())).toBe("moved");
    expect(decideEvent(crossing({ fieldVPerNm: 0.85 }), event())).toBe("moved");
    expect(decideEvent(crossing({ fieldVPerNm: 1.05 }), event())).toBeNull();
    expect(decideEvent(crossing({ fieldVPerNm: 1.1 }), event())).toBeNull(); // the bound is inside
  });

  it("never counts a move from an event without an interval", () => {
    expect(decideEvent(crossing({ fieldVPerNm: 5 }), event({ ci95LoVPerNm: null }))).toBeNull();
  });
});

describe("flagged picks and the fit (the lab's flagged-spectra setting)", () => {
  const flagged = { source: "auto" as const, excluded: false, flags: [{ code: "noisy" }] };

  it("keeps every pick in the fit when the lab includes flagged ones", () => {
    expect(flaggedOutOfFit("include", flagged)).toBe(false);
  });

  it("leaves out only flagged automatic picks when the lab excludes them", () => {
    expect(flaggedOutOfFit("exclude", flagged)).toBe(true);
    expect(flaggedOutOfFit("exclude", { ...flagged, source: "corrected" })).toBe(false); // an analyst looked at it
    expect(flaggedOutOfFit("exclude", { ...flagged, flags: [] })).toBe(false);
    expect(flaggedOutOfFit("exclude", { ...flagged, excluded: true })).toBe(false); // out by hand, not by the setting
  });
});
