import "server-only";
import type { SystemCtx } from "@/lib/base/context";
import { labForOwnerInput } from "@/lib/schemas/lab";
import { insertLab } from "../labs/shared";
import { parseInput } from "../parse";
import { insertInvitation } from "./shared";

/**
 * For the server-side command line (`bandcross lab create --name … --owner-email …`): a new lab
 * with no members yet and an owner's invitation, whose link the operator hands over (nothing is
 * mailed). Lab and invitation are stored together. Whoever can run this already holds the database.
 */
export async function createLabForOwner({ ctx, input }: { ctx: SystemCtx; input: unknown }) {
  const data = parseInput(labForOwnerInput, input);
  return ctx.db.transaction(async (tx) => {
    const lab = await insertLab(tx, data, null);
    const { invite, link } = await insertInvitation(tx, {
      labId: lab.id,
      email: data.ownerEmail,
      role: "owner",
      invitedBy: null,
    });
    return {
      lab: { id: lab.id, slug: lab.slug, name: lab.name },
      invitation: { email: invite.email, role: invite.role, expiresAt: invite.expiresAt, link },
    };
  });
}
