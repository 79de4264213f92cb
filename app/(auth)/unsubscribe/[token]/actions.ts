"use server";

import { db } from "@/db/client";
import type { ActionState } from "@/lib/actions/types";
import { unsubscribeByToken } from "@/lib/services/alerts/unsubscribe";

/** The one click of the unsubscribe page. The signed token is the only credential it needs. */
export async function unsubscribeAction(token: string): Promise<ActionState> {
  const out = await unsubscribeByToken({ db: db(), token: String(token) });
  return out.ok
    ? { ok: true, message: "Done: you will get no more e-mails about this sample." }
    : { ok: false, message: "This link is not valid. Open the sample in Bandcross and use its Watch button instead." };
}
