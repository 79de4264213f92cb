import { NextResponse, type NextRequest } from "next/server";
import { env } from "@/lib/env";
import { contentSecurityPolicy, uploadOrigins } from "@/lib/web/csp";

let connect: string[] | undefined;

/**
 * Runs before every page and API request (Next's proxy):
 * - an address whose percent-encoding is not valid UTF-8 (RFC 3986 §2.1, RFC 3629) is a 400 here,
 *   before routing tries to decode it (it was a 500);
 * - a page gets its Content-Security-Policy with a fresh nonce (`lib/web/csp.ts`), on the request
 *   too, where Next reads it to put the nonce on its scripts (Next's documented nonce pattern).
 */
export function proxy(request: NextRequest) {
  const path = request.nextUrl.pathname;
  try {
    decodeURIComponent(path);
  } catch {
    const message = "The address has a malformed percent-encoding (not UTF-8).";
    if (path.startsWith("/api/")) return NextResponse.json({ error: { code: "bad_request", message } }, { status: 400 });
    return new NextResponse(message, { status: 400, headers: { "content-type": "text/plain; charset=utf-8" } });
  }
  if (path.startsWith("/api/")) return NextResponse.next();
  const e = env();
  connect ??= uploadOrigins(e);
  const nonce = Buffer.from(crypto.getRandomValues(new Uint8Array(18))).toString("base64");
  const csp = contentSecurityPolicy({ nonce, connect, dev: e.NODE_ENV === "development", https: e.APP_URL.startsWith("https:") });
  const headers = new Headers(request.headers);
  headers.set("x-nonce", nonce);
  headers.set("content-security-policy", csp);
  const response = NextResponse.next({ request: { headers } });
  response.headers.set("content-security-policy", csp);
  return response;
}

export const config = {
  matcher: [
    {
      // Not the build's static files, the plotting library, the icons or the script worker.
      source: "/((?!_next/static|_next/image|vendor/|favicon|icon\\.svg|sw\\.js).*)",
      missing: [
        { type: "header", key: "next-router-prefetch" },
        { type: "header", key: "purpose", value: "prefetch" },
      ],
    },
  ],
};
