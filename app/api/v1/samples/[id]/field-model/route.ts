import { NextResponse } from "next/server";
import { apiRoute, readJson } from "@/lib/http/respond";
import { parseInput } from "@/lib/services/parse";
import { getSampleVersions } from "@/lib/services/analysis/getSampleVersions";
import { saveFieldModel } from "@/lib/services/analysis/saveFieldModel";
import { fieldModelBody } from "./schema";

export const GET = apiRoute<{ id: string }>(async ({ ctx, params }) => {
  const { field } = await getSampleVersions({ ctx, input: { sampleId: params.id } });
  return NextResponse.json({
    id: field.id,
    version: field.version,
    model: field.model,
    createdAt: field.createdAt.toISOString(),
  });
});

export const PUT = apiRoute<{ id: string }>(async ({ ctx, request, params }) => {
  const body = parseInput(fieldModelBody, await readJson(request));
  return NextResponse.json(await saveFieldModel({ ctx, input: { sampleId: params.id, model: body } }));
});
