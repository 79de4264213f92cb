/**
 * Fixtures for integration tests against the real PostgreSQL started by `npm test`: a lab with
 * one member per role, made through the database directly (the seed's own path), with slugs and
 * e-mails unique per call so test files never collide.
 */
import { randomUUID } from "node:crypto";
import bcrypt from "bcryptjs";
import { db } from "@/db/client";
import { labs, memberships, users, type MemberRole } from "@/db/schema";
import type { Actor, Ctx, Faults, SystemCtx } from "@/lib/base/context";

/** A system context (the worker's, a link's) on the test database, with the pauses a test puts in. */
export function system(faults?: Faults): SystemCtx {
  return { db: db(), task: "test", ...(faults && { faults }) };
}

export const TEST_PASSWORD = "correct horse battery";
let cachedHash: string | undefined;

export interface LabFixture {
  lab: { id: string; slug: string; name: string };
  people: Record<MemberRole, { id: string; email: string; name: string }>;
  ctx: (role: MemberRole) => Ctx;
}

export async function makeLab(name = "Test lab"): Promise<LabFixture> {
  const tag = randomUUID().slice(0, 8);
  cachedHash ??= await bcrypt.hash(TEST_PASSWORD, 4);
  const database = db();
  const [lab] = await database.insert(labs).values({ slug: `t-${tag}`, name: `${name} ${tag}` }).returning();
  const people = {} as LabFixture["people"];
  for (const role of ["owner", "microscopist", "analyst", "collaborator"] as const) {
    const [u] = await database
      .insert(users)
      .values({ email: `${role}-${tag}@lab.example`, name: `${role[0].toUpperCase()}${role.slice(1)} ${tag}`, passwordHash: cachedHash })
      .returning();
    await database.insert(memberships).values({ labId: lab.id, userId: u.id, role });
    people[role] = { id: u.id, email: u.email, name: u.name };
  }
  const ctx = (role: MemberRole): Ctx => {
    const p = people[role];
    const actor: Actor = { userId: p.id, email: p.email, name: p.name, labId: lab.id, labSlug: lab.slug, labName: lab.name, role, via: "session" };
    return { db: database, actor };
  };
  return { lab: { id: lab.id, slug: lab.slug, name: lab.name }, people, ctx };
}

export const sampleBody = (name = `Sample ${randomUUID().slice(0, 6)}`) => ({
  name,
  material: "germanene (bilayer)",
  workFunction_eV: 3.9,
  workFunctionSigma_eV: 0.1,
});

export const tipBody = (label = `W-${randomUUID().slice(0, 6)}`) => ({
  label,
  material: "W",
  workFunction_eV: 4.55, // Michaelson 1977 value for W (from memory), inside the CRC range 4.32–4.55 eV
  workFunctionSigma_eV: 0.1,
});

/** Resolves to the error a promise rejects with, or fails the test if it resolves. */
export async function rejection(p: Promise<unknown>): Promise<{ code?: string; status?: number; message: string }> {
  try {
    await p;
  } catch (e) {
    return e as { code?: string; status?: number; message: string };
  }
  throw new Error("expected the operation to be refused, but it succeeded");
}

/**
 * A copy of a spectrum with a single-point spike of +3 (about half a synthetic spectrum's maximum)
 * added at the bias closest to 0 V: the glitch the picker removes and flags (lib/spectra/edges).
 */
export function withSpikeAtZero<T extends { bias_V: Float64Array; didv: Float64Array }>(s: T): T {
  const didv = Float64Array.from(s.didv);
  let k = 0;
  for (let j = 0; j < s.bias_V.length; j++) if (Math.abs(s.bias_V[j]) < Math.abs(s.bias_V[k])) k = j;
  didv[k] += 3;
  return { ...s, didv };
}
