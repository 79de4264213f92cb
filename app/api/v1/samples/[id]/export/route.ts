import { NextResponse } from "next/server";
import { z } from "zod";
import { apiRoute } from "@/lib/http/respond";
import { methodsText } from "@/lib/services/exports/methodsText";
import { phaseCsv } from "@/lib/services/exports/phaseCsv";
import { phaseJson } from "@/lib/services/exports/phaseJson";
import { spectraCsv } from "@/lib/services/exports/spectraCsv";
import { parseInput } from "@/lib/services/parse";

const query = z.object({
  format: z.enum(["phase-csv", "spectra-csv", "json", "methods"], {
    error: "format is one of phase-csv, spectra-csv, json, methods",
  }),
});

const attachment = (name: string) => `attachment; filename="${name.replace(/[^A-Za-z0-9._-]/g, "_")}"`;

/** `?format=phase-csv|spectra-csv|json|methods`: downloads for a paper, every number with what made it. */
export const GET = apiRoute<{ id: string }>(async ({ ctx, request, params }) => {
  const { format } = parseInput(query, Object.fromEntries(new URL(request.url).searchParams));
  const input = { sampleId: params.id };
  if (format === "json") {
    const { fileName, body } = await phaseJson({ ctx, input });
    return NextResponse.json(body, { headers: { "content-disposition": attachment(fileName) } });
  }
  const { fileName, text } =
    format === "phase-csv"
      ? await phaseCsv({ ctx, input })
      : format === "spectra-csv"
        ? await spectraCsv({ ctx, input })
        : await methodsText({ ctx, input });
  return new NextResponse(text, {
    headers: {
      "content-type": format === "methods" ? "text/plain; charset=utf-8" : "text/csv; charset=utf-8",
      "content-disposition": attachment(fileName),
    },
  });
});
