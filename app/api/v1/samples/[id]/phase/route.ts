import { apiRoute } from "@/lib/http/respond";
import { getPhaseJson } from "@/lib/services/spectra/phaseCache";

export const GET = apiRoute<{ id: string }>(async ({ ctx, params }) => new Response(await getPhaseJson({ ctx, input: { sampleId: params.id } }), { headers: { "content-type": "application/json" } }));
