import "server-only";
import { createHash } from "node:crypto";
import { sql } from "drizzle-orm";
import type { Ctx } from "@/lib/base/context";
import { getSample } from "../samples/getSample";
import { getPhase } from "./getPhase";

/**
 * The phase endpoint's JSON, kept per sample in this process while nothing it shows has changed.
 * A sample of 5,000 spectra is ≈1.7 MB of JSON; building it (rows → objects → text) costs about
 * 100 ms of the server's single thread, so a few plots refreshing every 10 s would queue behind
 * each other. Every request still checks the actor's access to the sample (getSample), then asks
 * the database for a fingerprint of everything the answer is made of: the spectra and picks of the
 * sample (count, newest update, sum of pick versions), its latest crossing (id, status,
 * confirmation), the sample's name and the lab's setting for flagged spectra in the fit (which
 * marks points left out by it). Every write path sets `updated_at` (tagging, corrections,
 * exclusions, re-analysis, new uploads) and every refit adds a crossing row, so a change gives a
 * new fingerprint and the next request rebuilds. The fingerprint is read before the answer is
 * built, so a cached answer is never older than its fingerprint.
 */
const MAX_SAMPLES = 16;
interface Entry {
  key: string;
  etag: string;
  body: Promise<string>;
}
const cache = new Map<string, Entry>();

async function fingerprint(ctx: Ctx, sampleId: string, sampleName: string): Promise<string> {
  const r = await ctx.db.execute(sql`
    select
      (select concat_ws('/', count(*), max(s.updated_at), max(p.updated_at), sum(p.version))
         from spectra s left join gap_picks p on p.spectrum_id = s.id
        where s.sample_id = ${sampleId}) as pts,
      (select concat_ws('/', c.id, c.status, c.confirmed_at)
         from crossings c where c.sample_id = ${sampleId} and c.region is null
        order by c.created_at desc limit 1) as cr,
      (select l.flagged_in_fit from labs l where l.id = ${ctx.actor.labId}) as fl`);
  const row = r.rows[0] as { pts: string | null; cr: string | null; fl: string | null } | undefined;
  return `${row?.pts ?? ""}|${row?.cr ?? ""}|${row?.fl ?? ""}|${sampleName}`;
}

async function entryFor(ctx: Ctx, sampleId: string): Promise<Entry> {
  const sample = await getSample({ ctx, input: { id: sampleId } });
  const key = await fingerprint(ctx, sample.id, sample.name);
  const hit = cache.get(sample.id);
  if (hit && hit.key === key) {
    // Most recently used last.
    cache.delete(sample.id);
    cache.set(sample.id, hit);
    return hit;
  }
  const body = getPhase({ ctx, input: { sampleId: sample.id } }).then((p) => JSON.stringify(p));
  const entry: Entry = { key, etag: `W/"${createHash("sha1").update(`${sample.id}|${key}`).digest("base64url")}"`, body };
  cache.set(sample.id, entry);
  while (cache.size > MAX_SAMPLES) cache.delete(cache.keys().next().value!);
  body.catch(() => {
    if (cache.get(sample.id) === entry) cache.delete(sample.id);
  });
  return entry;
}

/**
 * `GET /api/v1/samples/{id}/phase` as JSON text (the same as JSON.stringify(await getPhase(...))),
 * with an entity tag from the same fingerprint: a client that has this version (If-None-Match)
 * gets `{ notModified: true }` and no body, which is what a plot refreshing every 10 s mostly needs.
 */
export async function getPhaseJson({ ctx, input }: { ctx: Ctx; input: { sampleId: string; ifNoneMatch?: string | null } }): Promise<{ etag: string; notModified: boolean; body: string | null }> {
  const e = await entryFor(ctx, input.sampleId);
  if (input.ifNoneMatch && input.ifNoneMatch.split(/\s*,\s*/).includes(e.etag)) return { etag: e.etag, notModified: true, body: null };
  return { etag: e.etag, notModified: false, body: await e.body };
}
