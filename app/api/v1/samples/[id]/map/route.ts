import { NextResponse } from "next/server";
import { apiRoute } from "@/lib/http/respond";
import { getGapMap } from "@/lib/services/spectra/getGapMap";

/** `?uploadId=`: the gap over position for one grid file of the sample (default: the largest). */
export const GET = apiRoute<{ id: string }>(async ({ ctx, request, params }) => {
  const uploadId = new URL(request.url).searchParams.get("uploadId") ?? undefined;
  return NextResponse.json(await getGapMap({ ctx, input: { sampleId: params.id, uploadId } }));
});
