import { NextResponse } from "next/server";
import { apiRoute, readJson } from "@/lib/http/respond";
import { parseInput } from "@/lib/services/parse";
import { correctPick } from "@/lib/services/picks/correctPick";
import { pickHistoryOf } from "@/lib/services/picks/pickHistoryOf";
import { correctPickBody } from "./schema";

/** The pick's history (who, when, old → new, why). */
export const GET = apiRoute<{ id: string }>(async ({ ctx, params }) =>
  NextResponse.json({ history: await pickHistoryOf({ ctx, input: { spectrumId: params.id } }) }),
);

/** Correct the band edges; a stale `version` gets 409 with who changed the pick and when. */
export const PATCH = apiRoute<{ id: string }>(async ({ ctx, request, params }) => {
  const body = parseInput(correctPickBody, await readJson(request));
  const { pick, crossing } = await correctPick({ ctx, input: { spectrumId: params.id, body } });
  return NextResponse.json({
    pick: {
      version: pick.version,
      source: pick.source,
      vbEdge_V: pick.vbEdgeV,
      cbEdge_V: pick.cbEdgeV,
      gap_eV: pick.gapEv,
    },
    crossing: { state: crossing.state, field_V_per_nm: crossing.fieldVPerNm },
  });
});
