import { NextResponse } from "next/server";
import { apiRoute } from "@/lib/http/respond";
import { completeUpload } from "@/lib/services/uploads/completeUpload";

/** The bytes are in storage: queue processing. Idempotent; 202 Accepted with the current status. */
export const POST = apiRoute<{ id: string }>(async ({ ctx, params }) =>
  NextResponse.json(await completeUpload({ ctx, input: { id: params.id } }), { status: 202 }),
);
