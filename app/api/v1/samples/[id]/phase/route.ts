import { apiRoute } from "@/lib/http/respond";
import { getPhaseJson } from "@/lib/services/spectra/getPhaseJson";

/** The phase plot's data; revalidate with If-None-Match (304 while nothing it shows has changed). */
export const GET = apiRoute<{ id: string }>(async ({ ctx, params, request }) => {
  const r = await getPhaseJson({
    ctx,
    input: { sampleId: params.id, ifNoneMatch: request.headers.get("if-none-match") },
  });
  const headers = { etag: r.etag, "cache-control": "private, no-cache", vary: "authorization, cookie" };
  if (r.notModified) return new Response(null, { status: 304, headers });
  return new Response(r.body, { headers: { ...headers, "content-type": "application/json" } });
});
