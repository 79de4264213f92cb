import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb } from "@/db/client";
import type { MemberRole } from "@/db/schema";
import { updateLabDefaults } from "@/lib/services/labs/updateLabDefaults";
import { changeRole } from "@/lib/services/members/changeRole";
import { inviteMember } from "@/lib/services/members/inviteMember";
import { listMembers } from "@/lib/services/members/listMembers";
import { removeMember } from "@/lib/services/members/removeMember";
import { createSample } from "@/lib/services/samples/createSample";
import { updateSample } from "@/lib/services/samples/updateSample";
import { createSession } from "@/lib/services/sessions/createSession";
import { updateSession } from "@/lib/services/sessions/updateSession";
import { createTip } from "@/lib/services/tips/createTip";
import { updateTip } from "@/lib/services/tips/updateTip";
import { createToken } from "@/lib/services/tokens/createToken";
import { revokeToken } from "@/lib/services/tokens/revokeToken";
import { makeLab, rejection, sampleBody, tipBody, type LabFixture } from "../support/fixtures";

/**
 * Each role against each protected operation that exists so far. The expected table is written
 * out here as the product's rule (README "Roles"), not derived from the code's permission map.
 */
const ROLES: MemberRole[] = ["owner", "microscopist", "analyst", "collaborator"];
const ALLOWED: Record<string, MemberRole[]> = {
  "create sample": ["owner", "microscopist", "analyst"],
  "edit sample": ["owner", "microscopist", "analyst"],
  "create tip": ["owner", "microscopist"],
  "edit tip": ["owner", "microscopist"],
  "create session": ["owner", "microscopist"],
  "edit session": ["owner", "microscopist"],
  "invite member": ["owner"],
  "change role": ["owner"],
  "remove member": ["owner"],
  "create token": ["owner"],
  "revoke token": ["owner"],
  "edit lab defaults": ["owner"],
};

let f: LabFixture;
let sampleId: string;
let tipId: string;
let sessionId: string;

beforeAll(async () => {
  f = await makeLab("Roles");
  const owner = f.ctx("owner");
  sampleId = (await createSample({ ctx: owner, input: sampleBody() })).id;
  tipId = (await createTip({ ctx: owner, input: tipBody() })).id;
  sessionId = (await createSession({ ctx: owner, input: { sampleId, tipId, label: "roles", date: "2026-11-20", temperature_K: 4.5 } })).id;
});
afterAll(closeDb);

/** Builds a fresh target per call so an allowed run does not change what the next role meets. */
const OPERATIONS: Record<string, (role: MemberRole) => Promise<unknown>> = {
  "create sample": (r) => createSample({ ctx: f.ctx(r), input: sampleBody() }),
  "edit sample": (r) => updateSample({ ctx: f.ctx(r), input: { id: sampleId, patch: { notes: `by ${r}` } } }),
  "create tip": (r) => createTip({ ctx: f.ctx(r), input: tipBody() }),
  "edit tip": (r) => updateTip({ ctx: f.ctx(r), input: { id: tipId, patch: { ...tipBody(`W-edit-${r}`) } } }),
  "create session": (r) => createSession({ ctx: f.ctx(r), input: { sampleId, label: `by ${r}`, date: "2026-11-21" } }),
  "edit session": (r) => updateSession({ ctx: f.ctx(r), input: { id: sessionId, patch: { sampleId, label: `edited by ${r}`, date: "2026-11-21" } } }),
  "invite member": (r) => inviteMember({ ctx: f.ctx(r), input: { email: `invitee-${r}-${Date.now()}@lab.example`, role: "analyst" } }),
  "change role": async (r) => {
    const { members } = await listMembers({ ctx: f.ctx("owner") });
    const target = members.find((m) => m.userId === f.people.collaborator.id)!;
    return changeRole({ ctx: f.ctx(r), input: { membershipId: target.id, role: "collaborator" } });
  },
  "remove member": async (r) => {
    // A throwaway member to remove, invited and accepted through the database directly.
    const extra = await makeLab("Extra");
    const { db } = f.ctx("owner");
    const { memberships } = await import("@/db/schema");
    const [m] = await db.insert(memberships).values({ labId: f.lab.id, userId: extra.people.analyst.id, role: "analyst" }).returning();
    return removeMember({ ctx: f.ctx(r), input: { membershipId: m.id } });
  },
  "create token": (r) => createToken({ ctx: f.ctx(r), input: { name: `by ${r}` } }),
  "revoke token": async (r) => {
    const { row } = await createToken({ ctx: f.ctx("owner"), input: { name: "to revoke" } });
    return revokeToken({ ctx: f.ctx(r), input: { id: row.id } });
  },
  "edit lab defaults": (r) =>
    updateLabDefaults({
      ctx: f.ctx(r),
      input: { name: f.lab.name, defaultTipWorkFunction_eV: 4.5, defaultTipWorkFunctionSigma_eV: 0.1, defaultSampleWorkFunction_eV: 4.5, defaultSampleWorkFunctionSigma_eV: 0.1 },
    }),
};

describe("lab roles on every protected operation", () => {
  it("covers every operation in the table", () => {
    expect(Object.keys(OPERATIONS).sort()).toEqual(Object.keys(ALLOWED).sort());
  });
  for (const [op, allowed] of Object.entries(ALLOWED)) {
    for (const role of ROLES) {
      const should = allowed.includes(role);
      it(`${role} ${should ? "may" : "may not"} ${op}`, async () => {
        if (should) {
          await expect(OPERATIONS[op](role)).resolves.not.toThrow();
        } else {
          const err = await rejection(OPERATIONS[op](role));
          expect(err.code).toBe("forbidden");
          expect(err.status).toBe(403);
        }
      });
    }
  }
});

describe("owner safeguards", () => {
  it("refuses to demote or remove the last owner", async () => {
    const g = await makeLab("Owners");
    const { members } = await listMembers({ ctx: g.ctx("owner") });
    const owner = members.find((m) => m.role === "owner")!;
    expect((await rejection(changeRole({ ctx: g.ctx("owner"), input: { membershipId: owner.id, role: "analyst" } }))).code).toBe("conflict");
    expect((await rejection(removeMember({ ctx: g.ctx("owner"), input: { membershipId: owner.id } }))).code).toBe("conflict");
  });
});
