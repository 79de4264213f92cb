import { NextResponse } from "next/server";
import { apiRoute } from "@/lib/http/respond";
import { getSessionBarrier } from "@/lib/services/curves/getSessionBarrier";

/**
 * The session's I(z) curves with κ, σκ and φ_ap each, and their weighted κ; `?data=1` adds z, current
 * and point status.
 */
export const GET = apiRoute<{ id: string }>(async ({ ctx, request, params }) => {
  const withData = new URL(request.url).searchParams.get("data") === "1";
  return NextResponse.json(await getSessionBarrier({ ctx, input: { sessionId: params.id, withData } }));
});
