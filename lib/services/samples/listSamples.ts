import "server-only";
import { sql } from "drizzle-orm";
import { assertCan } from "@/lib/base/permissions";
import type { Ctx } from "@/lib/base/context";
import { sampleVisibility } from "./visibility";
import { samples } from "@/db/schema";
import type { SampleSummary } from "./types";

export type { SampleSummary };

/**
 * The lab home's table: every visible sample with its spectra count, the gap of its most recent
 * spectrum that has a pick (excluded ones skipped), and its current whole-sample crossing.
 * One query with lateral joins, so the page cost does not grow with the number of samples.
 */
export async function listSamples({ ctx }: { ctx: Ctx; input?: undefined }): Promise<SampleSummary[]> {
  assertCan(ctx.actor, "lab:read");
  const visible = await sampleVisibility(ctx);
  const rows = await ctx.db.execute(sql`
    select samples.id, samples.name, samples.material, samples.substrate, samples.work_function_ev, samples.updated_at,
      (select count(*)::int from spectra sp where sp.sample_id = samples.id) as spectra_count,
      lg.gap_ev as latest_gap_ev, lg.closed as latest_gap_closed,
      c.state as crossing_state, c.field_v_per_nm as crossing_field, c.status as crossing_status
    from ${samples}
    left join lateral (
      select gp.gap_ev, gp.closed from spectra sp join gap_picks gp on gp.spectrum_id = sp.id
      where sp.sample_id = samples.id and not gp.excluded and gp.status = 'ok'
      order by sp.created_at desc, sp.index_in_file desc limit 1
    ) lg on true
    left join lateral (
      select state, field_v_per_nm, status from crossings c
      where c.sample_id = samples.id and c.region is null order by c.created_at desc limit 1
    ) c on true
    where ${visible}
    order by samples.name asc`);
  return rows.rows.map((r: Record<string, unknown>) => ({
    id: String(r.id),
    name: String(r.name),
    material: String(r.material),
    substrate: (r.substrate as string | null) ?? null,
    workFunctionEv: Number(r.work_function_ev),
    spectraCount: Number(r.spectra_count),
    latestGapEv: r.latest_gap_ev == null ? null : Number(r.latest_gap_ev),
    latestGapClosed: r.latest_gap_closed == null ? null : Boolean(r.latest_gap_closed),
    crossingState: (r.crossing_state as SampleSummary["crossingState"]) ?? null,
    crossingFieldVPerNm: r.crossing_field == null ? null : Number(r.crossing_field),
    crossingStatus: (r.crossing_status as string | null) ?? null,
    updatedAt: new Date(r.updated_at as string).toISOString(),
  }));
}
