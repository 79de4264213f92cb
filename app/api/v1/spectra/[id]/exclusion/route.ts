import { NextResponse } from "next/server";
import { apiRoute, readJson } from "@/lib/http/respond";
import { parseInput } from "@/lib/services/parse";
import { setExcluded } from "@/lib/services/picks/setExcluded";
import { exclusionBody } from "./schema";

export const PUT = apiRoute<{ id: string }>(async ({ ctx, request, params }) => {
  const body = parseInput(exclusionBody, await readJson(request));
  const { pick } = await setExcluded({ ctx, input: { spectrumId: params.id, body } });
  return NextResponse.json({
    pick: { version: pick.version, excluded: pick.excluded, excludedReason: pick.excludedReason },
  });
});
