import "server-only";
import { desc, eq } from "drizzle-orm";
import { crossingEvents, users } from "@/db/schema";
import { can } from "@/lib/base/permissions";
import type { Ctx } from "@/lib/base/context";
import { getSample } from "../samples/getSample";
import { isCrossed } from "./afterRefit";
import { currentCrossing } from "./currentCrossing";
import { intervalOf } from "./shared";

/** A sample's crossing events, newest first, with its current fit and whether the actor may confirm it: the timeline. */
export async function listCrossingEvents({ ctx, input }: { ctx: Ctx; input: { sampleId: string } }) {
  const sample = await getSample({ ctx, input: { id: input.sampleId } });
  const rows = await ctx.db.select().from(crossingEvents).where(eq(crossingEvents.sampleId, sample.id)).orderBy(desc(crossingEvents.createdAt)).limit(200);
  const confirmerIds = [...new Set(rows.map((r) => (r.data as Record<string, unknown>).confirmedBy).filter((v): v is string => typeof v === "string"))];
  const names = new Map<string, string>();
  for (const id of confirmerIds) {
    const [u] = await ctx.db.select({ name: users.name }).from(users).where(eq(users.id, id));
    if (u) names.set(id, u.name);
  }
  const current = await currentCrossing({ ctx, input: { sampleId: sample.id } });
  return {
    sampleId: sample.id,
    events: rows.map((e) => {
      const d = e.data as Record<string, unknown>;
      return {
        id: e.id,
        kind: e.kind as "found" | "moved" | "confirmed",
        crossingId: e.crossingId,
        field_V_per_nm: e.fieldVPerNm,
        ci95_V_per_nm: intervalOf(e),
        nPoints: typeof d.nPoints === "number" ? d.nPoints : null,
        settingsVersion: typeof d.settingsVersion === "number" ? d.settingsVersion : null,
        fieldModelVersion: typeof d.fieldModelVersion === "number" ? d.fieldModelVersion : null,
        confirmedBy: typeof d.confirmedBy === "string" ? (names.get(d.confirmedBy) ?? null) : null,
        createdAt: e.createdAt.toISOString(),
      };
    }),
    current: current
      ? {
          id: current.id,
          state: current.state,
          status: current.status,
          field_V_per_nm: current.fieldVPerNm,
          ci95_V_per_nm: intervalOf(current),
          nPoints: current.nPoints,
          confirmable: isCrossed(current) && current.status !== "confirmed",
        }
      : null,
    canConfirm: can(ctx.actor.role, "analysis:write"),
  };
}
export type CrossingTimelineData = Awaited<ReturnType<typeof listCrossingEvents>>;
