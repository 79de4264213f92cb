import { eq } from "drizzle-orm";
import { afterAll, describe, expect, it } from "vitest";
import { closeDb, db } from "@/db/client";
import { apiTokens, invitations, users } from "@/db/schema";
import { MAX_FAILURES } from "@/lib/auth/throttle";
import { verifyCredentials } from "@/lib/auth/credentials";
import { acceptInvitation } from "@/lib/services/members/acceptInvitation";
import { describeInvitation } from "@/lib/services/members/describeInvitation";
import { inviteMember } from "@/lib/services/members/inviteMember";
import { listMembers } from "@/lib/services/members/listMembers";
import { createToken } from "@/lib/services/tokens/createToken";
import { makeLab, rejection, TEST_PASSWORD, system } from "../support/fixtures";
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
