import { NextResponse } from "next/server";
import { apiRoute, readJson } from "@/lib/http/respond";
import { parseInput } from "@/lib/services/parse";
import { tagSpectra } from "@/lib/services/spectra/tagSpectra";
import { tagSpectraBody } from "./schema";

export const PATCH = apiRoute(async ({ ctx, request }) => {
  const body = parseInput(tagSpectraBody, await readJson(request));
  const { updated } = await tagSpectra({ ctx, input: body });
  return NextResponse.json({ updated });
});
