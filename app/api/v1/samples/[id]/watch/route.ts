import { NextResponse } from "next/server";
import { apiRoute, readJson } from "@/lib/http/respond";
import { watchSample } from "@/lib/services/alerts/watchSample";
import { watchState } from "@/lib/services/alerts/watchState";
import { notFound } from "@/lib/base/errors";
import { parseInput } from "@/lib/services/parse";
import { isUuid } from "@/lib/services/samples/getSample";
import { watchBody } from "./schema";

export const GET = apiRoute<{ id: string }>(async ({ ctx, params }) => {
  if (!isUuid(params.id)) throw notFound("sample");
  return NextResponse.json(await watchState({ ctx, input: { sampleId: params.id } }));
});

export const PUT = apiRoute<{ id: string }>(async ({ ctx, request, params }) => {
  const body = parseInput(watchBody, await readJson(request));
  return NextResponse.json(await watchSample({ ctx, input: { sampleId: params.id, watching: body.watching } }));
});
