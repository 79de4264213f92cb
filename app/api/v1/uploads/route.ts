import { NextResponse } from "next/server";
import { apiRoute, readJson } from "@/lib/http/respond";
import { parseInput } from "@/lib/services/parse";
import { createUploads } from "@/lib/services/uploads/createUploads";
import { createUploadsBody } from "./schema";

export const POST = apiRoute(async ({ ctx, request }) => {
  const body = parseInput(createUploadsBody, await readJson(request));
  return NextResponse.json(await createUploads({ ctx, input: body }), { status: 201 });
});
