import "server-only";
import { randomBytes } from "node:crypto";
import { ne, sql } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { labs, memberships } from "@/db/schema";
import { sha256Hex } from "@/lib/auth/secrets";
import type { Actor, Ctx } from "@/lib/base/context";
import { invalid, isUniqueViolation } from "@/lib/base/errors";
import { DEMO_LAB_SLUG, slugFromName, type NewLabInput } from "@/lib/schemas/lab";

/**
 * True once the installation holds a lab of its own: any lab but the demo lab (slug `demo`, which
 * no other lab may take). Until then `/setup` is open.
 */
export async function ownLabExists(db: DbOrTx): Promise<boolean> {
  const [row] = await db
    .select({ n: sql<number>`count(*)::int` })
    .from(labs)
    .where(ne(labs.slug, DEMO_LAB_SLUG));
  return row.n > 0;
}

/**
 * Stores a new lab with its defaults and, when given, its first owner, in the caller's transaction.
 * A taken slug is a field error on `slug` (the caller's transaction then stores nothing).
 */
export async function insertLab(db: DbOrTx, data: NewLabInput, ownerId: string | null) {
  const slug = data.slug ?? slugFromName(data.name);
  let lab: typeof labs.$inferSelect;
  try {
    [lab] = await db
      .insert(labs)
      .values({
        slug,
        name: data.name,
        defaultTipWorkFunctionEv: data.defaultTipWorkFunction_eV,
        defaultTipWorkFunctionSigmaEv: data.defaultTipWorkFunctionSigma_eV,
        defaultSampleWorkFunctionEv: data.defaultSampleWorkFunction_eV,
        defaultSampleWorkFunctionSigmaEv: data.defaultSampleWorkFunctionSigma_eV,
      })
      .returning();
  } catch (e) {
    if (!isUniqueViolation(e)) throw e;
    const message = `The address "${slug}" is taken by another lab; choose another slug.`;
    throw invalid(message, { slug: [message] });
  }
  if (ownerId) await db.insert(memberships).values({ labId: lab.id, userId: ownerId, role: "owner" });
  return lab;
}

/** The new lab's owner as an actor, so its creation is audited in the new lab itself. */
export function ownerCtx(
  db: DbOrTx,
  lab: { id: string; slug: string; name: string },
  user: Omit<Actor, "labId" | "labSlug" | "labName" | "role">,
): Ctx {
  return { db, actor: { ...user, labId: lab.id, labSlug: lab.slug, labName: lab.name, role: "owner" } };
}

/** Letters and digits that cannot be misread for one another (no I, O, 0, 1): 32 of them, 5 bits each. */
const CODE_ALPHABET = "ABCDEFGHJKLMNPQRSTUVWXYZ23456789";

/** A setup code: 16 characters (80 random bits) in groups of four, easy to copy from a log. */
export function newSetupCode(): string {
  const chars = [...randomBytes(16)].map((b) => CODE_ALPHABET[b % 32]); // 256 = 8 × 32: no bias
  return [0, 4, 8, 12].map((i) => chars.slice(i, i + 4).join("")).join("-");
}

/** What is stored of a setup code: the SHA-256 of its characters, ignoring case, spaces and hyphens. */
export function setupCodeHash(code: string): string {
  return sha256Hex(code.toUpperCase().replace(/[^A-Z0-9]/g, ""));
}
