import { and, eq } from "drizzle-orm";
import { afterAll, describe, expect, it } from "vitest";
import { closeDb, db } from "@/db/client";
import { apiTokens, auditEvents, invitations, samples, users } from "@/db/schema";
import { actorForToken } from "@/lib/auth/actor";
import { LIMITS, waitAfter } from "@/lib/auth/throttle";
import { deviceOf, newDeviceCookie } from "@/lib/auth/device";
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

  it("slows an account after its free failures, by a wait that doubles and stops at a minute", async () => {
    const f = await makeLab("Throttle");
    const email = f.people.collaborator.email;
    const { free, capSeconds } = LIMITS.account;
    let now = new Date();
    const tryAt = (password: string, client: string) => verifyCredentials({ db: db(), input: { email, password, client }, now });
    // A stranger from many addresses (documentation range, RFC 5737), each guess as soon as it may.
    for (let i = 0; i < free + 12; i++) {
      const r = await tryAt(`guess ${i}`, `192.0.2.${i + 1}`);
      expect(r).toEqual({ ok: false, reason: "invalid" });
      const wait = waitAfter("account", i + 1);
      if (i + 1 > free) expect(await tryAt(TEST_PASSWORD, "198.51.100.7")).toEqual({ ok: false, reason: "throttled", retryAfterSeconds: wait });
      now = new Date(now.getTime() + wait * 1000);
    }
    // The waits were 1, 2, 4 … s and stopped at the cap (OWASP: no lockout, a capped delay).
    expect(waitAfter("account", free + 1)).toBe(1);
    expect(waitAfter("account", free + 12)).toBe(capSeconds);
    expect(capSeconds).toBeLessThanOrEqual(60);
    // The owner of the account, from a browser new to it, gets in after at most the cap.
    expect((await tryAt(TEST_PASSWORD, "198.51.100.7")).ok).toBe(true);
    // Another person is not affected at any time.
    expect((await verifyCredentials({ db: db(), input: { email: f.people.owner.email, password: TEST_PASSWORD }, now })).ok).toBe(true);
  });

  it("throttles one client address across e-mails, more strictly", async () => {
    const f = await makeLab("Throttle client");
    const client = `203.0.113.${Math.floor(Math.random() * 250)}`; // TEST-NET-3 (RFC 5737)
    const now = new Date();
    for (let i = 0; i < LIMITS.client.free + 1; i++) {
      await verifyCredentials({ db: db(), input: { email: `spray-${i}-${client}@lab.example`, password: "x", client }, now });
    }
    expect(await verifyCredentials({ db: db(), input: { email: f.people.owner.email, password: TEST_PASSWORD, client }, now })).toEqual({ ok: false, reason: "throttled", retryAfterSeconds: 1 });
    expect(LIMITS.client.capSeconds).toBeGreaterThan(LIMITS.account.capSeconds);
  });

  it("a browser where the account signed in before is not slowed by a stranger's failures", async () => {
    const f = await makeLab("Throttle device");
    const email = f.people.owner.email;
    const device = newDeviceCookie(email);
    const now = new Date();
    for (let i = 0; i < LIMITS.account.free + 10; i++) await verifyCredentials({ db: db(), input: { email, password: `guess ${i}`, client: "192.0.2.77" }, now });
    expect((await verifyCredentials({ db: db(), input: { email, password: TEST_PASSWORD, client: "192.0.2.77" }, now })).ok).toBe(false);
    expect((await verifyCredentials({ db: db(), input: { email, password: TEST_PASSWORD, client: "192.0.2.77", device }, now })).ok).toBe(true);
    // A device cookie of another account, or a forged one, counts for nothing.
    expect(deviceOf(device, f.people.analyst.email)).toBeNull();
    expect(deviceOf(`${device.slice(0, -2)}xx`, email)).toBeNull();
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
