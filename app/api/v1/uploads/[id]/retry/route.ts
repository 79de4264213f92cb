import { NextResponse } from "next/server";
import { apiRoute } from "@/lib/http/respond";
import { retryUpload } from "@/lib/services/uploads/retryUpload";

export const POST = apiRoute<{ id: string }>(async ({ ctx, params }) =>
  NextResponse.json(await retryUpload({ ctx, input: { id: params.id } }), { status: 202 }),
);
