"use server";

import { revalidatePath } from "next/cache";
import type { ActionState } from "./types";
import { runAction } from "./validated";
import { confirmCrossing } from "@/lib/services/alerts/confirmCrossing";
import { markNotificationsRead } from "@/lib/services/alerts/markNotificationsRead";
import { watchSample } from "@/lib/services/alerts/watchSample";

/*
 * Server actions of the crossing alerts. Public endpoints like every action: runAction resolves
 * the actor from the session and the lab slug; the services validate the input and check roles
 * and visibility.
 */

export async function watchSampleAction(lab: string, sampleId: string, watching: boolean): Promise<ActionState> {
  return runAction(lab, undefined, async (ctx) => {
    const out = await watchSample({ ctx, input: { sampleId, watching } });
    return { data: out };
  });
}

/**
 * Confirms the crossing the analyst sees: its id and its value travel with the click (409 when either is no longer
 * current).
 */
export async function confirmCrossingAction(
  lab: string,
  sampleId: string,
  crossingId: string,
  field_V_per_nm?: number,
): Promise<ActionState> {
  const state = await runAction(lab, undefined, async (ctx) => {
    const out = await confirmCrossing({ ctx, input: { sampleId, crossingId, field_V_per_nm } });
    return {
      data: out,
      message: out.alreadyConfirmed
        ? "This critical field was already confirmed."
        : "Confirmed. Everyone watching the sample is told.",
    };
  });
  if (state.ok) revalidatePath(`/labs/${lab}/samples/${sampleId}`);
  return state;
}

export async function markReadAction(lab: string, ids: string[] | "all"): Promise<ActionState> {
  const state = await runAction(lab, undefined, async (ctx) => {
    const out = await markNotificationsRead({ ctx, input: ids === "all" ? { all: true } : { ids } });
    return { data: out };
  });
  revalidatePath(`/labs/${lab}`, "layout");
  return state;
}
