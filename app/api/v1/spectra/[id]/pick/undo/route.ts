import { NextResponse } from "next/server";
import { apiRoute, readJson } from "@/lib/http/respond";
import { undoPickChange } from "@/lib/services/picks/undoPickChange";

/** Body `{ version }`: undo the latest change to the pick. */
export const POST = apiRoute<{ id: string }>(async ({ ctx, request, params }) => {
  const { pick } = await undoPickChange({ ctx, input: { spectrumId: params.id, body: await readJson(request) } });
  return NextResponse.json({
    pick: {
      version: pick.version,
      source: pick.source,
      vbEdge_V: pick.vbEdgeV,
      cbEdge_V: pick.cbEdgeV,
      excluded: pick.excluded,
    },
  });
});
