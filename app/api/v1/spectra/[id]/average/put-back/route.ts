import { NextResponse } from "next/server";
import { apiRoute, readJson } from "@/lib/http/respond";
import { parseInput } from "@/lib/services/parse";
import { putBackMember } from "@/lib/services/spectra/putBackMember";
import { putBackMemberBody } from "./schema";

/** Puts a left-out repeat back: the average is made again with it; answers the new average's id. */
export const POST = apiRoute<{ id: string }>(async ({ ctx, request, params }) => {
  const { id, leftOut, warnings } = await putBackMember({ ctx, input: { id: params.id, body: parseInput(putBackMemberBody, await readJson(request)) } });
  return NextResponse.json({ id, leftOut, warnings });
});
