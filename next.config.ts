import type { NextConfig } from "next";

const nextConfig: NextConfig = {
  // Plotly is large and browser-only; it is loaded with next/dynamic on the pages that plot.
  serverExternalPackages: ["pg", "pg-boss", "s3rver"],
  poweredByHeader: false,
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
        ],
      },
    ];
  },
};

export default nextConfig;
