import { eq, sql } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { auditEvents, labs, memberships, setupCodes, users } from "@/db/schema";
import { verifyPassword } from "@/lib/auth/password";
import type { SystemCtx } from "@/lib/base/context";
import { DEMO_PEOPLE, seedDemoLab } from "@/lib/services/demo/seedDemoLab";
import { getSetupState } from "@/lib/services/labs/getSetupState";
import { issueSetupCode } from "@/lib/services/labs/issueSetupCode";
import { ALREADY_SET_UP, setUpLab } from "@/lib/services/labs/setUpLab";
import { rejection } from "../support/fixtures";
import { freshDatabase, type FreshDatabase } from "../support/fresh-db";

/**
 * Setting up a group's own lab (/setup) on databases of their own: the shared test database holds
 * many labs, and setup is open only while none but the demo lab exists. The rules checked are the
 * product's (README "Start it"): a one-time code from the start log, one setup, nothing half-stored.
 */

let first: FreshDatabase;
let second: FreshDatabase;
const ctxOf = (f: FreshDatabase): SystemCtx => ({ db: f.db, task: "test" });

beforeAll(async () => {
  [first, second] = await Promise.all([freshDatabase(), freshDatabase()]);
});
afterAll(async () => {
  await Promise.all([first?.drop(), second?.drop()]);
});

const setupBody = (code: string, over: Record<string, unknown> = {}) => ({
  code,
  name: "Okafor Nanoscale Transport Group",
  slug: "okafor-group",
  ownerName: "Adaeze Okafor",
  email: "adaeze@okafor-lab.example",
  password: "tunnelling-2026",
  // Tip: W, 4.55 eV; sample: a film's 4.1 eV, as text the way the form sends them (CRC range for W
  // 4.32-4.55 eV, from memory).
  defaultTipWorkFunction_eV: "4.55",
  defaultTipWorkFunctionSigma_eV: "0.1",
  defaultSampleWorkFunction_eV: "4,1", // a decimal comma is read (lib/schemas/number.ts)
  defaultSampleWorkFunctionSigma_eV: "0.15",
  ...over,
});

async function counts(f: FreshDatabase) {
  const n = async (t: typeof labs | typeof users | typeof memberships | typeof auditEvents) =>
    (await f.db.select({ n: sql<number>`count(*)::int` }).from(t))[0].n;
  const used = (
    await f.db
      .select({ n: sql<number>`count(*)::int` })
      .from(setupCodes)
      .where(sql`used_at is not null`)
  )[0].n;
  return {
    labs: await n(labs),
    users: await n(users),
    memberships: await n(memberships),
    audit: await n(auditEvents),
    used,
  };
}

describe("setup of a group's own lab", () => {
  it("is open on an empty installation, and still with the demo lab only", async () => {
    const ctx = ctxOf(first);
    expect(await getSetupState({ ctx })).toEqual({ open: true });
    expect((await seedDemoLab({ ctx })).created).toBe(true);
    expect(await getSetupState({ ctx })).toEqual({ open: true });
  });

  it("refuses a wrong code and bad input with clear messages, storing nothing", async () => {
    const ctx = ctxOf(first);
    const { code } = await issueSetupCode({ ctx });
    expect(code).toMatch(/^[A-Z2-9]{4}-[A-Z2-9]{4}-[A-Z2-9]{4}-[A-Z2-9]{4}$/);
    const before = await counts(first);

    const wrong = await rejection(setUpLab({ ctx, input: setupBody("ABCD-EFGH-JKLM-NPQR") }));
    expect(wrong.code).toBe("invalid");
    expect(wrong.message).toMatch(/setup code is not valid/);

    const bad = (await rejection(
      setUpLab({
        ctx,
        input: setupBody(code!, {
          slug: "Okafor Group!",
          email: "adaeze at okafor",
          password: "short",
          defaultTipWorkFunction_eV: "12", // no metal's work function is above 7 eV (CRC Handbook)
          defaultSampleWorkFunctionSigma_eV: "a lot",
        }),
      }),
    )) as { code?: string; fieldErrors?: Record<string, string[]> };
    expect(bad.code).toBe("invalid");
    expect(bad.fieldErrors?.slug?.[0]).toMatch(/lowercase letters, digits and single hyphens/);
    expect(bad.fieldErrors?.email?.[0]).toBe("Enter an e-mail address.");
    expect(bad.fieldErrors?.password?.[0]).toBe("Use at least 10 characters.");
    expect(bad.fieldErrors?.defaultTipWorkFunction_eV?.[0]).toMatch(/above 7 eV is not physical/);
    expect(bad.fieldErrors?.defaultSampleWorkFunctionSigma_eV?.[0]).toMatch(/eV/);

    const reserved = (await rejection(setUpLab({ ctx, input: setupBody(code!, { slug: "demo" }) }))) as {
      fieldErrors?: Record<string, string[]>;
    };
    expect(reserved.fieldErrors?.slug?.[0]).toMatch(/kept for the demo lab/);

    // A demo person's address is an account already: its password is not replaced by setup.
    const taken = (await rejection(setUpLab({ ctx, input: setupBody(code!, { email: DEMO_PEOPLE[0].email }) }))) as {
      fieldErrors?: Record<string, string[]>;
    };
    expect(taken.fieldErrors?.email?.[0]).toMatch(/account with this e-mail exists already/);

    expect(await counts(first)).toEqual(before);
    expect(await getSetupState({ ctx })).toEqual({ open: true });
  });

  it("creates the lab, its owner and its defaults with the code, and then closes", async () => {
    const ctx = ctxOf(first);
    const { code } = await issueSetupCode({ ctx });
    // Typed by hand: lower case and without hyphens is the same code.
    const made = await setUpLab({ ctx, input: setupBody(code!.toLowerCase().replace(/-/g, " ")) });
    expect(made.lab.slug).toBe("okafor-group");

    const [lab] = await first.db.select().from(labs).where(eq(labs.id, made.lab.id));
    expect(lab.name).toBe("Okafor Nanoscale Transport Group");
    expect([lab.defaultTipWorkFunctionEv, lab.defaultTipWorkFunctionSigmaEv]).toEqual([4.55, 0.1]);
    expect([lab.defaultSampleWorkFunctionEv, lab.defaultSampleWorkFunctionSigmaEv]).toEqual([4.1, 0.15]);
    const [owner] = await first.db.select().from(users).where(eq(users.email, "adaeze@okafor-lab.example"));
    expect(owner.name).toBe("Adaeze Okafor");
    expect(await verifyPassword("tunnelling-2026", owner.passwordHash)).toBe(true);
    const roles = await first.db
      .select({ role: memberships.role })
      .from(memberships)
      .where(eq(memberships.labId, lab.id));
    expect(roles).toEqual([{ role: "owner" }]);
    const audit = await first.db.select().from(auditEvents).where(eq(auditEvents.labId, lab.id));
    expect(audit.map((a) => [a.action, a.actorId])).toEqual([["lab.setup", owner.id]]);
    const [spent] = await first.db.select().from(setupCodes).where(eq(setupCodes.labId, lab.id));
    expect(spent.usedAt).toBeInstanceOf(Date);

    expect(await getSetupState({ ctx })).toEqual({ open: false });
    expect(await issueSetupCode({ ctx })).toEqual({ code: null });
    const before = await counts(first);
    const again = await rejection(
      setUpLab({ ctx, input: setupBody(code!, { slug: "second-group", email: "someone@else.example" }) }),
    );
    expect([again.code, again.message]).toEqual(["conflict", ALREADY_SET_UP]);
    expect(await counts(first)).toEqual(before);
  });

  it("takes only the latest code, and spends it once when two setups race", async () => {
    const ctx = ctxOf(second);
    const older = (await issueSetupCode({ ctx })).code!;
    const latest = (await issueSetupCode({ ctx })).code!;
    expect(latest).not.toBe(older);
    expect((await rejection(setUpLab({ ctx, input: setupBody(older) }))).message).toMatch(/latest start log/);

    const results = await Promise.allSettled([
      setUpLab({ ctx, input: setupBody(latest, { slug: "first-try", email: "one@lab.example" }) }),
      setUpLab({ ctx, input: setupBody(latest, { slug: "second-try", email: "two@lab.example" }) }),
    ]);
    expect(results.map((r) => r.status).sort()).toEqual(["fulfilled", "rejected"]);
    const c = await counts(second);
    expect([c.labs, c.users, c.memberships, c.used]).toEqual([1, 1, 1, 1]);
  });
});
