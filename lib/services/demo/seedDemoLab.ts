import "server-only";
import { eq } from "drizzle-orm";
import bcrypt from "bcryptjs";
import { extractionSettingsVersions, fieldModelVersions, labs, subscriptions, measurementSessions, memberships, samples, tips, users, type MemberRole } from "@/db/schema";
import type { SystemCtx } from "@/lib/base/context";
import { DEMO_LAB_SLUG } from "@/lib/schemas/lab";
import { initialVersionRows } from "../samples/initialVersions";

export const DEMO_LAB = {
  slug: DEMO_LAB_SLUG,
  name: "Halvorsen Surface Physics Group",
  institution: "Lindqvist Institute (invented)",
};

export const DEMO_PEOPLE: { name: string; email: string; password: string; role: MemberRole }[] = [
  { name: "Ingrid Halvorsen", email: "ingrid@halvorsen-lab.example", password: "demo-owner-2026", role: "owner" },
  { name: "Kwame Asante", email: "kwame@halvorsen-lab.example", password: "demo-microscopist-2026", role: "microscopist" },
  { name: "Yuki Tanaka", email: "yuki@halvorsen-lab.example", password: "demo-analyst-2026", role: "analyst" },
  { name: "Pablo Ferreira", email: "pablo@ferreira-theory.example", password: "demo-collaborator-2026", role: "collaborator" },
];

/**
 * Seeds the demo lab once (slug "demo"): an invented group, its people (one per role), samples,
 * tips and sessions. Running it again changes nothing. The passwords are listed in README.md.
 */
export async function seedDemoLab({ ctx }: { ctx: SystemCtx; input?: undefined }): Promise<{ created: boolean }> {
  const { db } = ctx;
  const [existing] = await db.select().from(labs).where(eq(labs.slug, DEMO_LAB.slug));
  if (existing) return { created: false };
  await db.transaction(async (tx) => {
    const [lab] = await tx
      .insert(labs)
      .values({ ...DEMO_LAB, defaultTipWorkFunctionEv: 4.7, defaultTipWorkFunctionSigmaEv: 0.1, defaultSampleWorkFunctionEv: 3.9, defaultSampleWorkFunctionSigmaEv: 0.1 })
      .returning();
    const people: Record<string, string> = {};
    for (const p of DEMO_PEOPLE) {
      const [u] = await tx
        .insert(users)
        .values({ name: p.name, email: p.email, passwordHash: await bcrypt.hash(p.password, 11) })
        .onConflictDoUpdate({ target: users.email, set: { name: p.name } })
        .returning();
      people[p.role] = u.id;
      await tx.insert(memberships).values({ labId: lab.id, userId: u.id, role: p.role }).onConflictDoNothing();
    }
    const [tipW] = await tx
      .insert(tips)
      .values({ labId: lab.id, label: "W-17", material: "W (electrochemically etched)", workFunctionEv: 4.7, workFunctionSigmaEv: 0.1, preparedOn: "2026-11-18", notes: "Field-emitted on Au(111) before use.", createdBy: people.microscopist })
      .returning();
    await tx.insert(tips).values({ labId: lab.id, label: "PtIr-04", material: "Pt0.9Ir0.1 (cut)", workFunctionEv: 5.4, workFunctionSigmaEv: 0.15, preparedOn: "2026-10-02", createdBy: people.microscopist });
    const [film] = await tx
      .insert(samples)
      .values({ labId: lab.id, name: "GX-12 bilayer", material: "germanene (bilayer)", substrate: "MoS2 flake", workFunctionEv: 3.9, workFunctionSigmaEv: 0.1, notes: "Grown 2026-11-12, transferred in UHV suitcase.", createdBy: people.owner })
      .returning();
    const [film2] = await tx.insert(samples).values({ labId: lab.id, name: "SN-03 monolayer", material: "stanene (monolayer)", substrate: "Bi2Te3(111)", workFunctionEv: 4.3, workFunctionSigmaEv: 0.15, createdBy: people.owner }).returning();
    const [film3] = await tx.insert(samples).values({ labId: lab.id, name: "SN-05 step edge", material: "stanene (monolayer)", substrate: "Bi2Te3(111)", workFunctionEv: 4.3, workFunctionSigmaEv: 0.15, notes: "Gap map across a step edge, one setpoint.", createdBy: people.owner }).returning();
    for (const s of [film, film2, film3]) {
      const v = initialVersionRows(lab.id, s.id, people.owner);
      await tx.insert(extractionSettingsVersions).values(v.settings);
      await tx.insert(fieldModelVersions).values(v.field);
      // The lab's default: owners and analysts watch new samples (and hear of their crossings).
      await tx.insert(subscriptions).values([people.owner, people.analyst].map((userId) => ({ labId: lab.id, sampleId: s.id, userId })));
    }
    await tx.insert(measurementSessions).values({ labId: lab.id, sampleId: film.id, tipId: tipW.id, label: "GX-12 approach series A", date: "2026-11-20", instrument: "LT-STM bay 2", temperatureK: 4.6, operatorId: people.microscopist, createdBy: people.microscopist });
  });
  return { created: true };
}
