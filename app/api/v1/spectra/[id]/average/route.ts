import { NextResponse } from "next/server";
import { apiRoute } from "@/lib/http/respond";
import { undoAverage } from "@/lib/services/spectra/undoAverage";

/** Undoes an average: it is deleted and its members come back. */
export const DELETE = apiRoute<{ id: string }>(async ({ ctx, params }) => {
  const { members } = await undoAverage({ ctx, input: { id: params.id } });
  return NextResponse.json({ members });
});
