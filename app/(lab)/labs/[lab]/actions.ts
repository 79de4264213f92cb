"use server";

import { revalidatePath } from "next/cache";
import { redirect } from "next/navigation";
import type { ActionState } from "@/lib/actions/types";
import { runAction } from "@/lib/actions/validated";
import { createLab } from "@/lib/services/labs/createLab";
import { setFlaggedInFit } from "@/lib/services/labs/setFlaggedInFit";
import { updateLabDefaults } from "@/lib/services/labs/updateLabDefaults";
import { changeRole } from "@/lib/services/members/changeRole";
import { inviteMember } from "@/lib/services/members/inviteMember";
import { removeMember } from "@/lib/services/members/removeMember";
import { revokeInvitation } from "@/lib/services/members/revokeInvitation";
import { setSampleAccess } from "@/lib/services/members/setSampleAccess";
import { createSample } from "@/lib/services/samples/createSample";
import { updateSample } from "@/lib/services/samples/updateSample";
import { createSession } from "@/lib/services/sessions/createSession";
import { updateSession } from "@/lib/services/sessions/updateSession";
import { createTip } from "@/lib/services/tips/createTip";
import { updateTip } from "@/lib/services/tips/updateTip";
import { createToken } from "@/lib/services/tokens/createToken";
import { revokeToken } from "@/lib/services/tokens/revokeToken";

/*
 * Server actions of the lab area. Each one is a public endpoint: runAction resolves the actor from
 * the session and the lab slug (never from the form) and the service checks the role.
 */

const form = (fd: FormData) => Object.fromEntries([...fd.entries()].filter(([, v]) => typeof v === "string"));

export async function createSampleAction(lab: string, _s: ActionState, fd: FormData): Promise<ActionState> {
  let id: string | undefined;
  const state = await runAction(lab, fd, async (ctx) => {
    id = (await createSample({ ctx, input: form(fd) })).id;
  });
  if (state.ok && id) redirect(`/labs/${lab}/samples/${id}`);
  return state;
}

export async function updateSampleAction(
  lab: string,
  sampleId: string,
  _s: ActionState,
  fd: FormData,
): Promise<ActionState> {
  const state = await runAction(lab, fd, async (ctx) => {
    await updateSample({ ctx, input: { id: sampleId, patch: form(fd) } });
  });
  if (state.ok) redirect(`/labs/${lab}/samples/${sampleId}`);
  return state;
}

export async function createTipAction(lab: string, _s: ActionState, fd: FormData): Promise<ActionState> {
  const state = await runAction(lab, fd, async (ctx) => {
    await createTip({ ctx, input: form(fd) });
  });
  if (state.ok) redirect(`/labs/${lab}/tips`);
  return state;
}

export async function updateTipAction(lab: string, tipId: string, _s: ActionState, fd: FormData): Promise<ActionState> {
  const state = await runAction(lab, fd, async (ctx) => {
    await updateTip({ ctx, input: { id: tipId, patch: form(fd) } });
  });
  if (state.ok) redirect(`/labs/${lab}/tips`);
  return state;
}

export async function createSessionAction(lab: string, _s: ActionState, fd: FormData): Promise<ActionState> {
  let id: string | undefined;
  const state = await runAction(lab, fd, async (ctx) => {
    id = (await createSession({ ctx, input: form(fd) })).id;
  });
  if (state.ok && id) redirect(`/labs/${lab}/sessions/${id}`);
  return state;
}

export async function updateSessionAction(
  lab: string,
  sessionId: string,
  _s: ActionState,
  fd: FormData,
): Promise<ActionState> {
  const state = await runAction(lab, fd, async (ctx) => {
    await updateSession({ ctx, input: { id: sessionId, patch: form(fd) } });
  });
  if (state.ok) redirect(`/labs/${lab}/sessions/${sessionId}`);
  return state;
}

export async function inviteAction(lab: string, _s: ActionState, fd: FormData): Promise<ActionState> {
  const state = await runAction(lab, fd, async (ctx) => {
    await inviteMember({ ctx, input: form(fd) });
  });
  if (state.ok) revalidatePath(`/labs/${lab}/settings`);
  return state;
}

export async function changeRoleAction(
  lab: string,
  membershipId: string,
  _s: ActionState,
  fd: FormData,
): Promise<ActionState> {
  const state = await runAction(lab, fd, async (ctx) => {
    await changeRole({ ctx, input: { membershipId, role: fd.get("role") } });
  });
  revalidatePath(`/labs/${lab}/settings`);
  return state;
}

export async function removeMemberAction(
  lab: string,
  membershipId: string,
  _s: ActionState,
  fd: FormData,
): Promise<ActionState> {
  const state = await runAction(lab, fd, async (ctx) => {
    await removeMember({ ctx, input: { membershipId } });
  });
  revalidatePath(`/labs/${lab}/settings`);
  return state;
}

export async function revokeInvitationAction(
  lab: string,
  invitationId: string,
  _s: ActionState,
  fd: FormData,
): Promise<ActionState> {
  const state = await runAction(lab, fd, async (ctx) => {
    await revokeInvitation({ ctx, input: { id: invitationId } });
  });
  revalidatePath(`/labs/${lab}/settings`);
  return state;
}

export async function createTokenAction(lab: string, _s: ActionState, fd: FormData): Promise<ActionState> {
  const state = await runAction(lab, fd, async (ctx) => {
    const { token, row } = await createToken({ ctx, input: form(fd) });
    return { data: { token, name: row.name } };
  });
  revalidatePath(`/labs/${lab}/settings`);
  return state;
}

export async function revokeTokenAction(
  lab: string,
  tokenId: string,
  _s: ActionState,
  fd: FormData,
): Promise<ActionState> {
  const state = await runAction(lab, fd, async (ctx) => {
    await revokeToken({ ctx, input: { id: tokenId } });
  });
  revalidatePath(`/labs/${lab}/settings`);
  return state;
}

export async function updateLabDefaultsAction(lab: string, _s: ActionState, fd: FormData): Promise<ActionState> {
  const state = await runAction(lab, fd, async (ctx) => {
    await updateLabDefaults({ ctx, input: form(fd) });
  });
  revalidatePath(`/labs/${lab}`, "layout");
  return state;
}

export async function setFlaggedInFitAction(lab: string, _s: ActionState, fd: FormData): Promise<ActionState> {
  const state = await runAction(lab, fd, async (ctx) => {
    await setFlaggedInFit({ ctx, input: form(fd) });
  });
  revalidatePath(`/labs/${lab}`, "layout");
  return state;
}

export async function setSampleAccessAction(
  lab: string,
  userId: string,
  _s: ActionState,
  fd: FormData,
): Promise<ActionState> {
  const sampleIds = fd.getAll("sampleId").map(String);
  const state = await runAction(lab, undefined, async (ctx) => {
    await setSampleAccess({ ctx, input: { userId, sampleIds } });
  });
  revalidatePath(`/labs/${lab}/settings`);
  return state.ok
    ? { ...state, message: sampleIds.length ? `Limited to ${sampleIds.length} sample(s).` : "Sees every sample." }
    : state;
}

/** A new lab of one's own, from the lab switcher: its creator owns it and lands in it. */
export async function createLabAction(lab: string, _s: ActionState, fd: FormData): Promise<ActionState> {
  let slug: string | undefined;
  const state = await runAction(lab, fd, async (ctx) => {
    slug = (await createLab({ ctx, input: form(fd) })).slug;
  });
  if (state.ok && slug) redirect(`/labs/${slug}`);
  return state;
}
