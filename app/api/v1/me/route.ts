import { NextResponse } from "next/server";
import { apiRoute } from "@/lib/http/respond";

/** Who the token or session acts as: handy for scripts checking their token. */
export const GET = apiRoute(async ({ ctx }) => {
  const { userId, email, name, labSlug, labName, role, via } = ctx.actor;
  return NextResponse.json({ userId, email, name, lab: { slug: labSlug, name: labName }, role, via });
});
