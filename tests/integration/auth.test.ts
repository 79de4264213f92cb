import { and, eq } from "drizzle-orm";
import { afterAll, describe, expect, it } from "vitest";
import { closeDb, db } from "@/db/client";
import { apiTokens, auditEvents, invitations, samples, users } from "@/db/schema";
import { actorForToken } from "@/lib/auth/actor";
import { MAX_FAILURES } from "@/lib/auth/throttle";
import { verifyCredentials } from "@/lib/auth/credentials";
import { acceptInvitation } from "@/lib/services/members/acceptInvitation";
import { describeInvitation } from "@/lib/services/members/describeInvitation";
import { inviteMember } from "@/lib/services/members/inviteMember";
import { listMembers } from "@/lib/services/members/listMembers";
import { removeMember } from "@/lib/services/members/removeMember";
import { createSample } from "@/lib/services/samples/createSample";
import { createTip } from "@/lib/services/tips/createTip";
import { createToken } from "@/lib/services/tokens/createToken";
import { makeLab, rejection, sampleBody, TEST_PASSWORD, system, tipBody } from "../support/fixtures";
import { linkIn, mailsTo } from "../support/outbox";

afterAll(closeDb);

describe("sign-in", () => {
  it("accepts the right password and gives the same answer for an unknown e-mail and a wrong password", async () => {
    const f = await makeLab("Sign-in");
    const ok = await verifyCredentials({ db: db(), input: { email: f.people.analyst.email.toUpperCase(), password: TEST_PASSWORD } });
    expect(ok).toEqual({ ok: true, user: expect.objectContaining({ id: f.people.analyst.id }) });
    const wrong = await verifyCredentials({ db: db(), input: { email: f.people.analyst.email, password: "not the password" } });
    const unknown = await verifyCredentials({ db: db(), input: { email: "nobody-at-all@lab.example", password: "not the password" } });
    expect(wrong).toEqual({ ok: false, reason: "invalid" });
    expect(unknown).toEqual(wrong);
  });

  it(`throttles an e-mail after ${MAX_FAILURES} failures, even with the right password then`, async () => {
    const f = await makeLab("Throttle");
    const email = f.people.collaborator.email;
    for (let i = 0; i < MAX_FAILURES; i++) {
      expect((await verifyCredentials({ db: db(), input: { email, password: `guess ${i}` } })).ok).toBe(false);
    }
    expect(await verifyCredentials({ db: db(), input: { email, password: TEST_PASSWORD } })).toEqual({ ok: false, reason: "throttled" });
    // Another person is not affected.
    expect((await verifyCredentials({ db: db(), input: { email: f.people.owner.email, password: TEST_PASSWORD } })).ok).toBe(true);
  });

  it("throttles one client address across e-mails", async () => {
    const f = await makeLab("Throttle client");
    const clientKey = `203.0.113.${Math.floor(Math.random() * 250)}`; // TEST-NET-3 (RFC 5737)
    for (let i = 0; i < MAX_FAILURES; i++) {
      await verifyCredentials({ db: db(), input: { email: `spray-${i}@lab.example`, password: "x", clientKey } });
    }
    expect((await verifyCredentials({ db: db(), input: { email: f.people.owner.email, password: TEST_PASSWORD, clientKey } })).ok).toBe(false);
  });
});

describe("invitations", () => {
  it("an owner's invitation arrives by e-mail, sets a password once, and makes a member", async () => {
    const f = await makeLab("Invite");
    const email = `new-person-${Date.now()}@lab.example`;
    await inviteMember({ ctx: f.ctx("owner"), input: { email, role: "microscopist" } });
    const [mail] = await mailsTo(email);
    expect(mail.subject).toContain(f.lab.name);
    const link = linkIn(mail.text, "/invite/");
    expect(mail.html).toContain(link);
    const token = link.split("/invite/")[1];

    // Only a hash of the link's secret is stored.
    const stored = await db().select().from(invitations).where(eq(invitations.email, email));
    expect(stored[0].tokenHash).not.toContain(token);
    expect(stored[0].tokenHash).toMatch(/^[0-9a-f]{64}$/);

    expect(await describeInvitation({ ctx: system(), input: { token } })).toEqual({ email, role: "microscopist", labName: f.lab.name, existingAccount: false });
    await acceptInvitation({ ctx: system(), input: { token, name: "New Person", password: "a long new password" } });
    expect((await verifyCredentials({ db: db(), input: { email, password: "a long new password" } })).ok).toBe(true);
    const { members } = await listMembers({ ctx: f.ctx("owner") });
    expect(members.find((m) => m.email === email)?.role).toBe("microscopist");

    // The link works once.
    expect(await describeInvitation({ ctx: system(), input: { token } })).toBeNull();
    expect((await rejection(acceptInvitation({ ctx: system(), input: { token, name: "Again", password: "another long password" } }))).status).toBe(422);
    const [u] = await db().select().from(users).where(eq(users.email, email));
    expect(u.name).toBe("New Person");
  });

  it("refuses to invite someone who is already a member", async () => {
    const f = await makeLab("Invite twice");
    expect((await rejection(inviteMember({ ctx: f.ctx("owner"), input: { email: f.people.analyst.email, role: "analyst" } }))).status).toBe(409);
  });

  it("rejects a bad e-mail or role with field errors", async () => {
    const f = await makeLab("Invite bad");
    const err = (await rejection(inviteMember({ ctx: f.ctx("owner"), input: { email: "not-an-address", role: "chief" } }))) as { status: number; fieldErrors?: Record<string, string[]> };
    expect(err.status).toBe(422);
    expect(Object.keys(err.fieldErrors ?? {}).sort()).toEqual(["email", "role"]);
  });
});

describe("API tokens", () => {
  it("are shown once and stored only as a SHA-256 hash", async () => {
    const f = await makeLab("Tokens");
    const { token, row } = await createToken({ ctx: f.ctx("owner"), input: { name: "acquisition PC" } });
    expect(token).toMatch(/^bxt_[A-Za-z0-9_-]{40,}$/);
    const [stored] = await db().select().from(apiTokens).where(eq(apiTokens.id, row.id));
    expect(stored.tokenHash).toMatch(/^[0-9a-f]{64}$/);
    expect(JSON.stringify(stored)).not.toContain(token.slice(12));
  });
});

describe("removing a member", () => {
  it("revokes their API tokens, audited; inviting the same person again does not bring a token back", async () => {
    const f = await makeLab("Remove revokes");
    const owner = f.ctx("owner");
    const { token } = await createToken({ ctx: owner, input: { name: "analyst PC", userId: f.people.analyst.id } });
    expect((await actorForToken(db(), token)).role).toBe("analyst");
    const membershipId = (await listMembers({ ctx: owner })).members.find((m) => m.userId === f.people.analyst.id)!.id;
    await removeMember({ ctx: owner, input: { membershipId } });

    // The same person invited again, with another role, joins with their existing account.
    await inviteMember({ ctx: owner, input: { email: f.people.analyst.email, role: "microscopist" } });
    const [mail] = await mailsTo(f.people.analyst.email);
    const link = linkIn(mail.text, "/invite/").split("/invite/")[1];
    await acceptInvitation({ ctx: system(), input: { token: link, name: f.people.analyst.name, password: "an unused long password" } });
    expect((await listMembers({ ctx: owner })).members.find((m) => m.userId === f.people.analyst.id)?.role).toBe("microscopist");

    // The old token stays dead: it must not act with the new role.
    expect((await rejection(actorForToken(db(), token))).status).toBe(401);
    const [stored] = await db().select().from(apiTokens).where(eq(apiTokens.labId, f.lab.id));
    expect(stored.revokedAt).toBeInstanceOf(Date);
    const events = await db().select().from(auditEvents).where(and(eq(auditEvents.labId, f.lab.id), eq(auditEvents.action, "token.revoke")));
    expect(events).toEqual([expect.objectContaining({ targetId: stored.id, actorId: f.people.owner.id, data: expect.objectContaining({ reason: "member removed" }) })]);
  });
});

describe("text with a NUL character", () => {
  // PostgreSQL text cannot hold the character U+0000 (PostgreSQL manual, "Character Types":
  // "the character with code zero (sometimes called NUL) cannot be stored").
  it("is refused with a 422 naming the field, in a name and in a note, and nothing is stored", async () => {
    const f = await makeLab("NUL text");
    const owner = f.ctx("owner");
    const named = (await rejection(createSample({ ctx: owner, input: sampleBody("GX\u0000-01") }))) as { status: number; fieldErrors?: Record<string, string[]> };
    expect(named.status).toBe(422);
    expect(Object.keys(named.fieldErrors ?? {})).toEqual(["name"]);
    const noted = (await rejection(createTip({ ctx: owner, input: { ...tipBody(), notes: "cleaned\u0000 by field emission" } }))) as { status: number; fieldErrors?: Record<string, string[]> };
    expect(noted.status).toBe(422);
    expect(Object.keys(noted.fieldErrors ?? {})).toEqual(["notes"]);
    expect(noted.fieldErrors?.notes?.[0]).toMatch(/NUL|control character/i);
    expect(await db().select().from(samples).where(eq(samples.labId, f.lab.id))).toEqual([]);
  });
});
