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

export interface Ctx {
  db: DbOrTx;
  actor: Actor;
}

/** Every service verb has this shape. */
export type Service<I, O> = (args: { ctx: Ctx; input: I }) => Promise<O>;
