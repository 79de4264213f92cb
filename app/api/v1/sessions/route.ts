import { NextResponse } from "next/server";
import { apiRoute, readJson } from "@/lib/http/respond";
import { presentSession } from "@/lib/http/present";
import { parseInput } from "@/lib/services/parse";
import { createSession } from "@/lib/services/sessions/createSession";
import { listSessions } from "@/lib/services/sessions/listSessions";
import { createSessionBody } from "./schema";

export const GET = apiRoute(async ({ ctx, request }) => {
  const sampleId = new URL(request.url).searchParams.get("sampleId") ?? undefined;
  return NextResponse.json({ sessions: await listSessions({ ctx, input: { sampleId } }) });
});

export const POST = apiRoute(async ({ ctx, request }) => {
  const body = parseInput(createSessionBody, await readJson(request));
  return NextResponse.json(presentSession(await createSession({ ctx, input: body })), { status: 201 });
});
