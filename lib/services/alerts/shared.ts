import "server-only";
import { and, eq } from "drizzle-orm";
import { notifications } from "@/db/schema";
import type { Ctx } from "@/lib/base/context";

/*
 * The actor's in-app notifications in the current lab: one row per person per event, written when
 * the event is recorded (lib/services/alerts/recordEvent.ts). Nobody reads or marks another
 * person's rows: every query is scoped to the actor's user id and lab.
 */

export const mine = (ctx: Ctx) => and(eq(notifications.userId, ctx.actor.userId), eq(notifications.labId, ctx.actor.labId));


export const intervalOf = (r: { ci95LoVPerNm: number | null; ci95HiVPerNm: number | null }): [number, number] | null =>
  r.ci95LoVPerNm != null && r.ci95HiVPerNm != null ? [r.ci95LoVPerNm, r.ci95HiVPerNm] : null;
