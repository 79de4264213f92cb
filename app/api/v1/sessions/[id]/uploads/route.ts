import { NextResponse } from "next/server";
import { apiRoute } from "@/lib/http/respond";
import { listSessionUploads } from "@/lib/services/uploads/listSessionUploads";

export const GET = apiRoute<{ id: string }>(async ({ ctx, params }) =>
  NextResponse.json({ uploads: await listSessionUploads({ ctx, input: { sessionId: params.id } }) }),
);
