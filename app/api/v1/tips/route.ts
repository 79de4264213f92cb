import { NextResponse } from "next/server";
import { apiRoute, readJson } from "@/lib/http/respond";
import { presentTip } from "@/lib/http/present";
import { parseInput } from "@/lib/services/parse";
import { createTip } from "@/lib/services/tips/createTip";
import { listTips } from "@/lib/services/tips/listTips";
import { createTipBody } from "./schema";

export const GET = apiRoute(async ({ ctx }) => NextResponse.json({ tips: (await listTips({ ctx })).map(presentTip) }));

export const POST = apiRoute(async ({ ctx, request }) => {
  const body = parseInput(createTipBody, await readJson(request));
  return NextResponse.json(presentTip(await createTip({ ctx, input: body })), { status: 201 });
});
