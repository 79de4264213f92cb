import { NextResponse } from "next/server";
import { apiRoute, readJson } from "@/lib/http/respond";
import { confirmCrossing } from "@/lib/services/alerts/confirmCrossing";
import { parseInput } from "@/lib/services/parse";
import { confirmBody } from "./schema";

export const POST = apiRoute<{ id: string }>(async ({ ctx, request, params }) => {
  const hasBody =
    Number(request.headers.get("content-length") ?? 0) > 0 || request.headers.get("transfer-encoding") != null;
  const body = parseInput(confirmBody, hasBody ? await readJson(request) : {});
  return NextResponse.json(await confirmCrossing({ ctx, input: { sampleId: params.id, ...body } }));
});
