import { NextResponse } from "next/server";
import { apiRoute, readJson } from "@/lib/http/respond";
import { parseInput } from "@/lib/services/parse";
import { acceptPick } from "@/lib/services/picks/acceptPick";
import { acceptBody } from "./schema";

/** Accept the pick as it is (recorded in its history with the version); a stale `version` gets 409. */
export const POST = apiRoute<{ id: string }>(async ({ ctx, request, params }) => {
  const body = parseInput(acceptBody, await readJson(request));
  const { pick, acceptedAt } = await acceptPick({ ctx, input: { spectrumId: params.id, body } });
  return NextResponse.json({
    pick: {
      version: pick.version,
      source: pick.source,
      vbEdge_V: pick.vbEdgeV,
      cbEdge_V: pick.cbEdgeV,
      excluded: pick.excluded,
    },
    acceptedAt: acceptedAt.toISOString(),
  });
});
