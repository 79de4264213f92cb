import { NextResponse } from "next/server";
import { apiRoute } from "@/lib/http/respond";
import { getSpectrum } from "@/lib/services/spectra/getSpectrum";

export const GET = apiRoute<{ id: string }>(async ({ ctx, params }) =>
  NextResponse.json(await getSpectrum({ ctx, input: { id: params.id } })),
);
