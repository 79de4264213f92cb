import { NextResponse } from "next/server";
import { apiRoute } from "@/lib/http/respond";
import { listCrossingEvents } from "@/lib/services/alerts/listCrossingEvents";
import { notFound } from "@/lib/base/errors";
import { isUuid } from "@/lib/services/samples/getSample";

export const GET = apiRoute<{ id: string }>(async ({ ctx, params }) => {
  if (!isUuid(params.id)) throw notFound("sample");
  return NextResponse.json(await listCrossingEvents({ ctx, input: { sampleId: params.id } }));
});
