import { NextResponse } from "next/server";
import { apiRoute, readJson } from "@/lib/http/respond";
import { presentSample } from "@/lib/http/present";
import { getSample } from "@/lib/services/samples/getSample";
import { updateSample } from "@/lib/services/samples/updateSample";

export const GET = apiRoute<{ id: string }>(async ({ ctx, params }) =>
  NextResponse.json(presentSample(await getSample({ ctx, input: { id: params.id } }))),
);

export const PATCH = apiRoute<{ id: string }>(async ({ ctx, request, params }) => {
  await getSample({ ctx, input: { id: params.id } });
  const row = await updateSample({ ctx, input: { id: params.id, patch: await readJson(request) } });
  return NextResponse.json(presentSample(row));
});
