import { NextResponse } from "next/server";
import { apiRoute, readJson } from "@/lib/http/respond";
import { presentSample } from "@/lib/http/present";
import { createSample } from "@/lib/services/samples/createSample";
import { listSamples } from "@/lib/services/samples/listSamples";
import { parseInput } from "@/lib/services/parse";
import { createSampleBody } from "./schema";

export const GET = apiRoute(async ({ ctx }) => NextResponse.json({ samples: await listSamples({ ctx }) }));

export const POST = apiRoute(async ({ ctx, request }) => {
  const body = parseInput(createSampleBody, await readJson(request));
  const row = await createSample({ ctx, input: body });
  return NextResponse.json(presentSample(row), { status: 201 });
});
