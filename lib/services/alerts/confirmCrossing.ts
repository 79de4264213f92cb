import "server-only";
import { z } from "zod";
import { crossings } from "@/db/schema";
import { assertCan } from "@/lib/base/permissions";
import { eq } from "drizzle-orm";
import { recordAudit } from "../audit";
import type { Ctx } from "@/lib/base/context";
import { conflict } from "@/lib/base/errors";
import { numberInput } from "@/lib/schemas/number";
import { parseInput } from "../parse";
import { getSample } from "../samples/getSample";
import { isCrossed } from "./afterRefit";
import { currentCrossing } from "./currentCrossing";
import { intervalOf } from "./shared";
import { lockSample } from "./lockSample";
import { recordEvent } from "./recordEvent";

export const confirmCrossingInput = z.object({
  sampleId: z.string().uuid("sampleId must be a sample id."),
  /** The crossing the analyst looked at; if the fit changed since, the confirmation is refused. */
  crossingId: z.string().uuid("crossingId must be a crossing id.").optional(),
  /** The critical field the analyst saw (V/nm); a crossing whose value differs is not the one they reviewed. */
  field_V_per_nm: numberInput(z.number({ error: "field_V_per_nm must be a number (V/nm)" }).optional()),
});

/** The current crossing in words, for a refused confirmation: "0.874 V/nm [0.861, 0.888], field model v3". */
const currentInWords = (c: { fieldVPerNm: number | null; ci95LoVPerNm: number | null; ci95HiVPerNm: number | null }) =>
  `${c.fieldVPerNm!.toFixed(3)} V/nm${c.ci95LoVPerNm != null && c.ci95HiVPerNm != null ? ` [${c.ci95LoVPerNm.toFixed(3)}, ${c.ci95HiVPerNm.toFixed(3)}]` : ""}`;

/** The value shown and sent back differs from the stored one by more than rounding to 9 significant digits. */
const sameValue = (a: number, b: number) => Math.abs(a - b) <= 1e-9 * Math.max(1, Math.abs(b));

/**
 * An analyst (or owner) confirms the sample's current crossing: it becomes `confirmed` and a
 * `confirmed` event tells the people watching the sample (not the person who confirmed it).
 * Confirming what is already confirmed changes nothing. Runs under the same sample lock as the
 * refit decisions, so a refit landing at the same moment is either before (and then the analyst is
 * told the fit changed, when they named the crossing) or after.
 */
export async function confirmCrossing({ ctx, input }: { ctx: Ctx; input: unknown }) {
  assertCan(ctx.actor, "analysis:write");
  const data = parseInput(confirmCrossingInput, input);
  const sample = await getSample({ ctx, input: { id: data.sampleId } });
  const out = await ctx.db.transaction(async (tx) => {
    const locked = { ...ctx, db: tx };
    await lockSample({ ctx: locked, input: { sampleId: sample.id } });
    const current = await currentCrossing({ ctx: locked, input: { sampleId: sample.id } });
    if (!isCrossed(current)) throw conflict("There is no critical field to confirm: the current fit of this sample does not close and reopen.");
    if ((data.crossingId && data.crossingId !== current.id) || (data.field_V_per_nm != null && !sameValue(data.field_V_per_nm, current.fieldVPerNm!))) {
      throw conflict(`The fit changed since you looked at it: the critical field is now ${currentInWords(current)}. Review it before confirming.`, {
        currentCrossingId: current.id,
        field_V_per_nm: current.fieldVPerNm,
        ci95_V_per_nm: intervalOf(current),
      });
    }
    if (current.status === "confirmed") return { crossing: current, event: null, alreadyConfirmed: true };
    const [confirmed] = await tx
      .update(crossings)
      .set({ status: "confirmed", confirmedBy: ctx.actor.userId, confirmedAt: new Date() })
      .where(eq(crossings.id, current.id))
      .returning();
    const event = await recordEvent({
      ctx: locked,
      input: {
        crossing: confirmed,
        kind: "confirmed",
        extra: { confirmedBy: ctx.actor.userId, confirmedByName: ctx.actor.name },
        excludeUserId: ctx.actor.userId,
      },
    });
    await recordAudit(locked, "crossing.confirm", { type: "sample", id: sample.id }, { crossingId: confirmed.id, field_V_per_nm: confirmed.fieldVPerNm });
    return { crossing: confirmed, event, alreadyConfirmed: false };
  });
  return {
    crossingId: out.crossing.id,
    status: out.crossing.status,
    field_V_per_nm: out.crossing.fieldVPerNm,
    ci95_V_per_nm: out.crossing.ci95LoVPerNm != null && out.crossing.ci95HiVPerNm != null ? [out.crossing.ci95LoVPerNm, out.crossing.ci95HiVPerNm] : null,
    confirmedAt: out.crossing.confirmedAt?.toISOString() ?? null,
    eventId: out.event?.id ?? null,
    alreadyConfirmed: out.alreadyConfirmed,
  };
}
