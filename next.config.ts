import type { NextConfig } from "next";
import { PHASE_PRODUCTION_SERVER } from "next/constants";
import { PERMISSIONS_POLICY } from "./lib/web/csp";
import { builtPlotly, vendorPlotly } from "./scripts/plotly-vendor";

/**
 * The plotting library ships as a static file of its own, built from the installed sources with
 * only the trace types Bandcross draws (scripts/plotly-vendor.ts, components/plots/plotly-script.ts);
 * every `next build`, `next dev` and `next start` has the one matching the lock file, and the
 * pages learn its address from BANDCROSS_PLOTLY_SRC. public/vendor/ is not committed. `next start`
 * uses the file the build made (its pages name it) and never removes one.
 */
export default async function nextConfig(phase: string): Promise<NextConfig> {
  const plotlySrc = phase === PHASE_PRODUCTION_SERVER ? await builtPlotly() : await vendorPlotly();
  return {
    serverExternalPackages: ["pg", "pg-boss", "s3rver"],
    poweredByHeader: false,
    env: { BANDCROSS_PLOTLY_SRC: plotlySrc },
    // The app's own files; `npm run typecheck` checks everything, scripts and tests included.
    typescript: { tsconfigPath: "tsconfig.app.json" },
    typedRoutes: false,
    experimental: { serverActions: { bodySizeLimit: "2mb" } },
    async headers() {
      return [
        {
          source: "/(.*)",
          headers: [
            { key: "X-Content-Type-Options", value: "nosniff" },
            { key: "Referrer-Policy", value: "same-origin" },
            { key: "X-Frame-Options", value: "DENY" },
            { key: "Permissions-Policy", value: PERMISSIONS_POLICY },
          ],
        },
        {
          // JSON and CSV answers: nothing in them may load or run (pages get theirs from proxy.ts).
          source: "/api/:path*",
          headers: [{ key: "Content-Security-Policy", value: "default-src 'none'; frame-ancestors 'none'" }],
        },
        {
          // Pages that plot: the browser starts fetching the library with the response's headers,
          // before it has parsed any HTML.
          source: "/labs/:lab/(samples|spectra)/:id",
          headers: [{ key: "Link", value: `<${plotlySrc}>; rel=preload; as=script; fetchpriority=high` }],
        },
        {
          // Content-keyed file names: new content is a new address.
          source: "/vendor/:file*",
          headers: [{ key: "Cache-Control", value: "public, max-age=31536000, immutable" }],
        },
      ];
    },
  };
}
