import type { MemberRole } from "@/db/schema";
import type { DbOrTx } from "@/db/client";

/** Who is acting, in which lab, and how they proved it. Lab and author ids always come from here, never from a request body. */
export interface Actor {
  userId: string;
  email: string;
  name: string;
  labId: string;
  labSlug: string;
  labName: string;
  role: MemberRole;
  via: "session" | "token";
  tokenId?: string;
}

/** What every context carries: the database handle (a transaction's, inside one). */
export interface DbCtx {
  db: DbOrTx;
}

/** A person's call: a signed-in member or an API token, checked against the role table by every verb. */
export interface Ctx extends DbCtx {
  actor: Actor;
}

/**
 * Pauses a test may put into a system task, to stop it at a chosen point (a crash, a race). Only
 * tests and the worker's test mode set them; production code paths leave them out.
 */
export interface Faults {
  afterRead?: () => Promise<void>;
  afterParse?: () => Promise<void>;
}

/**
 * Work no signed-in person asks for at that moment: the worker's jobs, links that are their own
 * credential (an invitation, an unsubscribe link), sign-in itself, the seed, the command line's
 * `token create` and `lab create`, and `/setup` (its code). `task` names it for logs and audit; there
 * is no actor, so such a verb checks what its own credential allows (the job's row, the link's token).
 */
export interface SystemCtx extends DbCtx {
  task: string;
  faults?: Faults;
}

/** Every service verb has this shape. */
export type Service<I, O> = (args: { ctx: Ctx; input: I }) => Promise<O>;
