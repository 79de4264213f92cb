import { NextResponse } from "next/server";
import { apiRoute } from "@/lib/http/respond";
import { getUpload } from "@/lib/services/uploads/getUpload";

export const GET = apiRoute<{ id: string }>(async ({ ctx, params }) =>
  NextResponse.json(await getUpload({ ctx, input: { id: params.id } })),
);
