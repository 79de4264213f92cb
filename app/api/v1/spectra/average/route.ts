import { NextResponse } from "next/server";
import { apiRoute, readJson } from "@/lib/http/respond";
import { parseInput } from "@/lib/services/parse";
import { createAverage } from "@/lib/services/spectra/createAverage";
import { averageSpectraBody } from "./schema";

/** Averages the given spectra into one; answers the average's id, the members left out and the warnings. */
export const POST = apiRoute(async ({ ctx, request }) => {
  const body = parseInput(averageSpectraBody, await readJson(request));
  const { id, leftOut, warnings } = await createAverage({ ctx, input: body });
  return NextResponse.json({ id, leftOut, warnings }, { status: 201 });
});
