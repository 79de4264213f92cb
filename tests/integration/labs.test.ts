import { spawn } from "node:child_process";
import { randomUUID } from "node:crypto";
import { and, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, db } from "@/db/client";
import { auditEvents, invitations, labs, memberships } from "@/db/schema";
import { listMembershipsOfUser } from "@/lib/auth/memberships";
import { sha256Hex } from "@/lib/auth/secrets";
import type { Ctx } from "@/lib/base/context";
import { stopBoss } from "@/lib/jobs/queue";
import { createLab } from "@/lib/services/labs/createLab";
import { getStartSteps } from "@/lib/services/labs/getStartSteps";
import { acceptInvitation } from "@/lib/services/members/acceptInvitation";
import { createLabForOwner } from "@/lib/services/members/createLabForOwner";
import { describeInvitation } from "@/lib/services/members/describeInvitation";
import { createSample } from "@/lib/services/samples/createSample";
import { createSession } from "@/lib/services/sessions/createSession";
import { createTip } from "@/lib/services/tips/createTip";
import { makeSpectrum, spectrumToCsv } from "@/lib/spectra";
import { makeLab, rejection, sampleBody, system, tipBody, type LabFixture } from "../support/fixtures";
import { bytesOf, uploadFile } from "../support/pipeline";

/** More labs: a member starts one from the lab switcher; an operator makes one on the server for an owner. */

let home: LabFixture;
beforeAll(async () => {
  home = await makeLab("Home");
});
afterAll(async () => {
  await stopBoss();
  await closeDb();
});

const tag = () => randomUUID().slice(0, 8);
const newLab = (slug: string, over: Record<string, unknown> = {}) => ({
  name: `Spin-polarised STM ${slug}`,
  slug,
  defaultTipWorkFunction_eV: "5.3", // Pt-Ir tip; Pt 5.12-5.93 eV (CRC Handbook, from memory)
  defaultTipWorkFunctionSigma_eV: "0.2",
  defaultSampleWorkFunction_eV: "4.3",
  defaultSampleWorkFunctionSigma_eV: "0.1",
  ...over,
});

describe("a member starts a lab of their own", () => {
  it("makes them its owner, keeps its defaults, and lists it beside their other labs", async () => {
    const slug = `spin-${tag()}`;
    const analyst = home.ctx("analyst");
    const made = await createLab({ ctx: analyst, input: newLab(slug) });
    expect(made.slug).toBe(slug);
    const [lab] = await db().select().from(labs).where(eq(labs.id, made.id));
    expect([lab.defaultTipWorkFunctionEv, lab.defaultTipWorkFunctionSigmaEv]).toEqual([5.3, 0.2]);
    expect([lab.defaultSampleWorkFunctionEv, lab.defaultSampleWorkFunctionSigmaEv]).toEqual([4.3, 0.1]);
    const mine = await listMembershipsOfUser({ db: db(), userId: home.people.analyst.id });
    expect(mine.map((l) => [l.slug, l.role]).sort()).toEqual(
      [
        [home.lab.slug, "analyst"],
        [slug, "owner"],
      ].sort(),
    );
    const audit = await db().select().from(auditEvents).where(eq(auditEvents.labId, made.id));
    expect(audit.map((a) => [a.action, a.actorId])).toEqual([["lab.create", home.people.analyst.id]]);
  });

  it("makes a slug from the name when none is given", async () => {
    const t = tag();
    const made = await createLab({
      ctx: home.ctx("collaborator"),
      input: newLab("", { name: `Ångström Probes ${t}` }),
    });
    expect(made.slug).toBe(`angstrom-probes-${t}`);
  });

  it("refuses a taken or reserved slug and bad defaults with field messages, storing nothing", async () => {
    const owner = home.ctx("owner");
    const name = `Refused ${tag()}`;
    const taken = (await rejection(createLab({ ctx: owner, input: newLab(home.lab.slug, { name }) }))) as {
      code?: string;
      fieldErrors?: Record<string, string[]>;
    };
    expect(taken.code).toBe("invalid");
    expect(taken.fieldErrors?.slug?.[0]).toMatch(/taken by another lab/);
    const reserved = (await rejection(createLab({ ctx: owner, input: newLab("demo", { name }) }))) as {
      fieldErrors?: Record<string, string[]>;
    };
    expect(reserved.fieldErrors?.slug?.[0]).toMatch(/kept for the demo lab/);
    // Below 2 eV is no metal's or film's work function (CRC Handbook; the schema's bound).
    const low = (await rejection(
      createLab({ ctx: owner, input: newLab(`x-${tag()}`, { name, defaultTipWorkFunction_eV: "1.2" }) }),
    )) as {
      fieldErrors?: Record<string, string[]>;
    };
    expect(low.fieldErrors?.defaultTipWorkFunction_eV?.[0]).toMatch(/below 2 eV is not physical/);
    expect(await db().select().from(labs).where(eq(labs.name, name))).toEqual([]);
  });
});

describe("a lab made on the server for its owner", () => {
  it("holds no one until the owner opens the invitation link, then them as owner", async () => {
    const slug = `ops-${tag()}`;
    const email = `owner-${tag()}@group.example`;
    const made = await createLabForOwner({ ctx: system(), input: { ...newLab(slug), ownerEmail: email } });
    expect(await db().select().from(memberships).where(eq(memberships.labId, made.lab.id))).toEqual([]);
    const secret = new URL(made.invitation.link).pathname.split("/").pop()!;
    const [invite] = await db().select().from(invitations).where(eq(invitations.labId, made.lab.id));
    expect(invite.tokenHash).toBe(sha256Hex(secret)); // only the hash is kept
    expect(await describeInvitation({ ctx: system(), input: { token: secret } })).toMatchObject({
      role: "owner",
      email,
    });
    await acceptInvitation({
      ctx: system(),
      input: { token: secret, name: "Operator's Owner", password: "a-long-password" },
    });
    const roles = await db()
      .select({ role: memberships.role })
      .from(memberships)
      .where(and(eq(memberships.labId, made.lab.id)));
    expect(roles).toEqual([{ role: "owner" }]);
  });

  it("refuses a bad e-mail and stores neither lab nor invitation", async () => {
    const slug = `bad-${tag()}`;
    const e = (await rejection(
      createLabForOwner({ ctx: system(), input: { ...newLab(slug), ownerEmail: "nobody" } }),
    )) as {
      fieldErrors?: Record<string, string[]>;
    };
    expect(e.fieldErrors?.ownerEmail?.[0]).toBe("Enter the owner's e-mail address.");
    expect(await db().select().from(labs).where(eq(labs.slug, slug))).toEqual([]);
  });
});

describe("a new lab's first steps", () => {
  it("ticks a tip, a sample, a session and an upload as each is added", async () => {
    const fresh = await makeLab("Steps");
    const owner: Ctx = fresh.ctx("owner");
    const steps = () => getStartSteps({ ctx: owner });
    expect(await steps()).toMatchObject({ tip: false, sample: false, session: false, upload: false, allDone: false });
    const tip = await createTip({ ctx: owner, input: tipBody() });
    expect(await steps()).toMatchObject({ tip: true, sample: false });
    const sample = await createSample({ ctx: owner, input: sampleBody() });
    expect(await steps()).toMatchObject({ sample: true, session: false, uploadSessionId: null });
    const session = await createSession({
      ctx: owner,
      input: { sampleId: sample.id, tipId: tip.id, label: "first approach", date: "2026-12-01" },
    });
    expect(await steps()).toMatchObject({ session: true, upload: false, uploadSessionId: session.id });
    // A collaborator sees the same ticks but gets no session to upload into.
    expect(await getStartSteps({ ctx: fresh.ctx("collaborator") })).toMatchObject({
      session: true,
      uploadSessionId: null,
    });
    await uploadFile(
      owner,
      session.id,
      "first.csv",
      bytesOf(spectrumToCsv(makeSpectrum({ vbEdge_V: -0.2, cbEdge_V: 0.2, seed: 3 }))),
    );
    expect(await steps()).toMatchObject({ upload: true, allDone: true });
  });
});

/** Runs the command line as an operator does (`npm run bandcross -- …` calls this launcher). */
function cli(args: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  return new Promise((resolve) => {
    const child = spawn(process.execPath, ["lib/cli/bin.mjs", ...args], { env: process.env });
    let stdout = "";
    let stderr = "";
    child.stdout.on("data", (d: Buffer) => (stdout += d.toString()));
    child.stderr.on("data", (d: Buffer) => (stderr += d.toString()));
    child.on("close", (code) => resolve({ code: code ?? 1, stdout, stderr }));
  });
}

describe("bandcross lab create", () => {
  it("prints a JSON object with the lab and its owner's invitation link", async () => {
    const slug = `cli-${tag()}`;
    const email = `cli-owner-${tag()}@group.example`;
    const r = await cli(["lab", "create", "--name", "Cryogenic STM", "--slug", slug, "--owner-email", email, "--json"]);
    expect(r.stderr).toBe("");
    expect(r.code).toBe(0);
    const out = JSON.parse(r.stdout);
    expect(out.lab).toMatchObject({ slug, name: "Cryogenic STM", url: `${process.env.APP_URL}/labs/${slug}` });
    expect(out.invitation).toMatchObject({ email, role: "owner" });
    expect(new Date(out.invitation.expiresAt).getTime()).toBeGreaterThan(Date.now());
    const secret = String(out.invitation.link).split("/invite/")[1];
    expect(await describeInvitation({ ctx: system(), input: { token: secret } })).toMatchObject({
      role: "owner",
      email,
    });
    const [lab] = await db().select().from(labs).where(eq(labs.slug, slug));
    expect([lab.defaultTipWorkFunctionEv, lab.defaultSampleWorkFunctionEv]).toEqual([4.5, 4.5]);
  });

  it("prints the link alone on the last line of its output, and takes the lab's work functions", async () => {
    const slug = `cli-${tag()}`;
    const r = await cli([
      "lab",
      "create",
      "--name",
      "Text",
      "--slug",
      slug,
      "--owner-email",
      "t@group.example",
      "--tip-work-function",
      "4.8",
    ]);
    expect(r.code).toBe(0);
    expect(r.stdout.trim()).toMatch(new RegExp(`^${process.env.APP_URL}/invite/bxi_[\\w-]+$`));
    expect(r.stderr).toMatch(/t@group\.example becomes its owner/);
    const [lab] = await db().select().from(labs).where(eq(labs.slug, slug));
    expect(lab.defaultTipWorkFunctionEv).toBe(4.8);
  });

  it("names the option at fault and creates nothing; a missing option is a usage error", async () => {
    const slug = `cli-${tag()}`;
    const r = await cli([
      "lab",
      "create",
      "--name",
      "Bad",
      "--slug",
      slug,
      "--owner-email",
      "b@group.example",
      "--tip-work-function",
      "12",
    ]);
    expect(r.code).toBe(1);
    expect(r.stderr).toMatch(/--tip-work-function: A work function above 7 eV is not physical/);
    expect(r.stdout).toBe("");
    expect(await db().select().from(labs).where(eq(labs.slug, slug))).toEqual([]);
    const usage = await cli(["lab", "create", "--name", "No owner"]);
    expect(usage.code).toBe(2);
    expect(usage.stderr).toMatch(/--owner-email is required/);
  });
});
