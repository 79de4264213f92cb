import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb } from "@/db/client";
import { actorForToken, actorForUser } from "@/lib/auth/actor";
import { changeRole } from "@/lib/services/members/changeRole";
import { inviteMember } from "@/lib/services/members/inviteMember";
import { listMembers } from "@/lib/services/members/listMembers";
import { removeMember } from "@/lib/services/members/removeMember";
import { revokeInvitation } from "@/lib/services/members/revokeInvitation";
import { createSample } from "@/lib/services/samples/createSample";
import { getSample } from "@/lib/services/samples/getSample";
import { listSamples } from "@/lib/services/samples/listSamples";
import { updateSample } from "@/lib/services/samples/updateSample";
import { createSession } from "@/lib/services/sessions/createSession";
import { getSession } from "@/lib/services/sessions/getSession";
import { listSessions } from "@/lib/services/sessions/listSessions";
import { updateSession } from "@/lib/services/sessions/updateSession";
import { createTip } from "@/lib/services/tips/createTip";
import { getTip } from "@/lib/services/tips/getTip";
import { listTips } from "@/lib/services/tips/listTips";
import { updateTip } from "@/lib/services/tips/updateTip";
import { createToken } from "@/lib/services/tokens/createToken";
import { listTokens } from "@/lib/services/tokens/listTokens";
import { revokeToken } from "@/lib/services/tokens/revokeToken";
import { makeLab, rejection, sampleBody, tipBody, type LabFixture } from "../support/fixtures";

/** A member of lab A, even its owner, never reads or changes lab B's records: always 403 or 404, never data. */
let a: LabFixture;
let b: LabFixture;
const B: Record<string, string> = {};

beforeAll(async () => {
  a = await makeLab("Lab A");
  b = await makeLab("Lab B");
  const bo = b.ctx("owner");
  B.sample = (await createSample({ ctx: bo, input: sampleBody("B secret sample") })).id;
  B.tip = (await createTip({ ctx: bo, input: tipBody("B-tip") })).id;
  B.session = (await createSession({ ctx: bo, input: { sampleId: B.sample, tipId: B.tip, label: "B session", date: "2026-11-02" } })).id;
  B.token = (await createToken({ ctx: bo, input: { name: "B token" } })).row.id;
  B.membership = (await listMembers({ ctx: bo })).members.find((m) => m.role === "analyst")!.id;
  B.invitation = (await inviteMember({ ctx: bo, input: { email: `b-invitee-${Date.now()}@lab.example`, role: "analyst" } })).invitation.id;
});
afterAll(closeDb);

describe("lab A's owner against lab B's records", () => {
  const attempts: Record<string, () => Promise<unknown>> = {
    "read sample": () => getSample({ ctx: a.ctx("owner"), input: { id: B.sample } }),
    "edit sample": () => updateSample({ ctx: a.ctx("owner"), input: { id: B.sample, patch: { notes: "x" } } }),
    "read tip": () => getTip({ ctx: a.ctx("owner"), input: { id: B.tip } }),
    "edit tip": () => updateTip({ ctx: a.ctx("owner"), input: { id: B.tip, patch: tipBody("hijack") } }),
    "read session": () => getSession({ ctx: a.ctx("owner"), input: { id: B.session } }),
    "edit session": () => updateSession({ ctx: a.ctx("owner"), input: { id: B.session, patch: { sampleId: B.sample, label: "x", date: "2026-11-02" } } }),
    "create a session on B's sample": () => createSession({ ctx: a.ctx("owner"), input: { sampleId: B.sample, label: "x", date: "2026-11-02" } }),
    "revoke B's token": () => revokeToken({ ctx: a.ctx("owner"), input: { id: B.token } }),
    "make a token acting as B's member": () => createToken({ ctx: a.ctx("owner"), input: { name: "x", userId: b.people.owner.id } }),
    "change a role in B": () => changeRole({ ctx: a.ctx("owner"), input: { membershipId: B.membership, role: "owner" } }),
    "remove a member of B": () => removeMember({ ctx: a.ctx("owner"), input: { membershipId: B.membership } }),
    "withdraw B's invitation": () => revokeInvitation({ ctx: a.ctx("owner"), input: { id: B.invitation } }),
  };
  for (const [name, attempt] of Object.entries(attempts)) {
    it(`cannot ${name}`, async () => {
      const err = await rejection(attempt());
      expect([403, 404]).toContain(err.status);
      expect(err.message).not.toContain("B secret");
    });
  }

  it("sees none of B's records in lists", async () => {
    const ctx = a.ctx("owner");
    expect((await listSamples({ ctx })).map((s) => s.id)).not.toContain(B.sample);
    expect((await listTips({ ctx })).map((t) => t.id)).not.toContain(B.tip);
    expect((await listSessions({ ctx })).map((s) => s.id)).not.toContain(B.session);
    expect((await listTokens({ ctx })).map((t) => t.id)).not.toContain(B.token);
  });

  it("cannot act in lab B by naming its slug", async () => {
    const err = await rejection(actorForUser(a.ctx("owner").db, a.people.owner.id, b.lab.slug));
    expect(err.status).toBe(404);
  });

  it("B's token acts in lab B only, and stops working once revoked", async () => {
    const { token, row } = await createToken({ ctx: b.ctx("owner"), input: { name: "scoped" } });
    const actor = await actorForToken(b.ctx("owner").db, token);
    expect(actor.labId).toBe(b.lab.id);
    expect(actor.labId).not.toBe(a.lab.id);
    await revokeToken({ ctx: b.ctx("owner"), input: { id: row.id } });
    expect((await rejection(actorForToken(b.ctx("owner").db, token))).status).toBe(401);
  });
});
