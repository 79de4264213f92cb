import "server-only";
import { and, eq, isNull, sql } from "drizzle-orm";
import type { DbOrTx } from "@/db/client";
import { setupCodes, users } from "@/db/schema";
import { hashPassword } from "@/lib/auth/password";
import type { SystemCtx } from "@/lib/base/context";
import { conflict, invalid } from "@/lib/base/errors";
import { setupInput } from "@/lib/schemas/lab";
import { recordAudit } from "../audit";
import { parseInput } from "../parse";
import { insertLab, ownLabExists, ownerCtx, setupCodeHash } from "./shared";

export const ALREADY_SET_UP = "Bandcross is already set up for a group: sign in, or ask a lab owner for an invitation.";

/**
 * `/setup`: the group's first own lab and its first owner, with the lab's default work functions.
 * The setup code of the start log is the credential (no one is signed in yet): it must be the
 * latest unused one, and is spent by this call. Everything is stored in one transaction, or
 * nothing; setups are serialised, and refused once any lab but the demo lab exists.
 */
export async function setUpLab({ ctx, input }: { ctx: SystemCtx; input: unknown }) {
  const data = parseInput(setupInput, input);
  // Checked before the slow password hash too, so refused calls cost the server next to nothing.
  await openCode(ctx.db, data.code);
  const passwordHash = await hashPassword(data.password);
  return ctx.db.transaction(async (tx) => {
    await tx.execute(sql`select pg_advisory_xact_lock(hashtext('bandcross:setup'))`);
    const code = await openCode(tx, data.code);
    const [taken] = await tx.select({ id: users.id }).from(users).where(eq(users.email, data.email));
    if (taken) {
      const message =
        "An account with this e-mail exists already: sign in with it and create a lab from the lab switcher.";
      throw invalid(message, { email: [message] });
    }
    const [owner] = await tx
      .insert(users)
      .values({ email: data.email, name: data.ownerName, passwordHash })
      .returning();
    const lab = await insertLab(tx, data, owner.id);
    await tx.update(setupCodes).set({ usedAt: new Date(), labId: lab.id }).where(eq(setupCodes.id, code.id));
    const owned = ownerCtx(tx, lab, { userId: owner.id, email: owner.email, name: owner.name, via: "session" });
    await recordAudit(owned, "lab.setup", { type: "lab", id: lab.id }, { slug: lab.slug, name: lab.name });
    return { lab: { id: lab.id, slug: lab.slug, name: lab.name }, owner: { id: owner.id, email: owner.email } };
  });
}

/** The unused setup code's row (locked inside a transaction), while setup is open; else the refusal. */
async function openCode(db: DbOrTx, code: string) {
  if (await ownLabExists(db)) throw conflict(ALREADY_SET_UP);
  const [row] = await db
    .select({ id: setupCodes.id })
    .from(setupCodes)
    .where(and(eq(setupCodes.codeHash, setupCodeHash(code)), isNull(setupCodes.usedAt)))
    .for("update");
  if (row) return row;
  const message = "That setup code is not valid or was used already: use the code of the latest start log.";
  throw invalid(message, { code: [message] });
}
