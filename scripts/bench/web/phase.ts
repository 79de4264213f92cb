/**
 * Part "phase": `GET /api/v1/samples/{id}/phase` for a sample of 5,000 spectra, 400 requests at 20
 * concurrent, bearer token, loopback; latency per request including the whole body. p50, p95, max
 * and requests per second, asked for without compression and then with gzip as browsers ask. Goal
 * p95 ≤ 200 ms (gzip). 20 warm-up requests first (not counted).
 */
import pLimit from "p-limit";
import { benchLab, line, phaseSample, quantileOf, requireStack, verdict } from "./common";

const REQUESTS = 400;
const CONCURRENCY = 20;

export async function run() {
  const { apiBase } = requireStack();
  const lab = await benchLab();
  const s = await phaseSample();
  line(`sample of ${s.spectra} spectra built in ${s.build_s.toFixed(1)} s (10 files of 500 spectra pushed with bandcross push)`);
  const url = `${apiBase}/api/v1/samples/${s.sampleId}/phase`;
  const auth = { authorization: `Bearer ${lab.token}` };
  let bytes = 0;
  let wire = 0;
  let points = 0;
  // fetch asks for "gzip, deflate" as browsers do and decompresses; the wire size is what came.
  const one = async (encoding: string) => {
    const t = performance.now();
    const res = await fetch(url, { headers: { ...auth, "accept-encoding": encoding } });
    const body = await res.arrayBuffer();
    if (!res.ok) throw new Error(`phase: HTTP ${res.status} ${new TextDecoder().decode(body).slice(0, 200)}`);
    bytes = body.byteLength;
    wire = Number(res.headers.get("content-length") ?? NaN);
    return performance.now() - t;
  };
  {
    const res = await fetch(url, { headers: auth });
    const j = (await res.json()) as { points: unknown[]; crossing: { state: string; field_V_per_nm: number | null } };
    points = j.points.length;
    line(`  phase data: ${points} points, crossing ${j.crossing.state}${j.crossing.field_V_per_nm != null ? ` at ${j.crossing.field_V_per_nm.toFixed(3)} V/nm` : ""}`);
  }
  const round = async (encoding: string) => {
    for (let i = 0; i < 20; i++) await one(encoding);
    const single = [];
    for (let i = 0; i < 10; i++) single.push(await one(encoding));
    const lat: number[] = [];
    const limit = pLimit(CONCURRENCY);
    const t0 = performance.now();
    await Promise.all(Array.from({ length: REQUESTS }, () => limit(async () => void lat.push(await one(encoding)))));
    const wall = (performance.now() - t0) / 1000;
    const size = Number.isFinite(wire) ? `${(wire / 1e6).toFixed(2)} MB on the wire` : "chunked";
    line(`  accept-encoding "${encoding}": response ${(bytes / 1e6).toFixed(2)} MB (${size}); one at a time: median ${quantileOf(single, 0.5).toFixed(0)} ms`);
    line(`    ${REQUESTS} requests at ${CONCURRENCY} concurrent: p50 ${quantileOf(lat, 0.5).toFixed(0)} ms, p95 ${quantileOf(lat, 0.95).toFixed(0)} ms, max ${Math.max(...lat).toFixed(0)} ms, ${(REQUESTS / wall).toFixed(1)} requests/s`);
    return lat;
  };
  await round("identity");
  const lat = await round("gzip, deflate");
  verdict(`phase endpoint p95 (5,000 spectra, ${CONCURRENCY} concurrent, gzip)`, quantileOf(lat, 0.95), 200, "ms", 0);
}
