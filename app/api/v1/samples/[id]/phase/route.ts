import { NextResponse } from "next/server";
import { apiRoute } from "@/lib/http/respond";
import { getPhase } from "@/lib/services/spectra/readSpectra";

export const GET = apiRoute<{ id: string }>(async ({ ctx, params }) => NextResponse.json(await getPhase({ ctx, input: { sampleId: params.id } })));
