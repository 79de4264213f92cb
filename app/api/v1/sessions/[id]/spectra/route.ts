import { NextResponse } from "next/server";
import { apiRoute } from "@/lib/http/respond";
import { spectraQuery } from "@/lib/schemas/uploads";
import { parseInput } from "@/lib/services/parse";
import { listSessionSpectra } from "@/lib/services/spectra/listSessionSpectra";

/** `?page&pageSize&sort&dir&q&region`: sorted, filtered and paginated on the server. */
export const GET = apiRoute<{ id: string }>(async ({ ctx, request, params }) => {
  const query = parseInput(spectraQuery, Object.fromEntries(new URL(request.url).searchParams));
  return NextResponse.json(await listSessionSpectra({ ctx, input: { sessionId: params.id, query } }));
});
