import fs from "node:fs";
import path from "node:path";
import type { NextConfig } from "next";

/**
 * The plotting library ships as a static, versioned file (see components/plots/plotly-script.ts):
 * copied here from the installed package, so every `next build`, `next dev` and `next start` has
 * the one matching the lock file. public/vendor/ is not committed.
 */
function vendorPlotly() {
  const pkgDir = path.dirname(require.resolve("plotly.js-dist-min/package.json"));
  const { version } = JSON.parse(fs.readFileSync(path.join(pkgDir, "package.json"), "utf8")) as { version: string };
  const target = path.join(process.cwd(), "public", "vendor", `plotly-${version}.min.js`);
  const source = path.join(pkgDir, "plotly.min.js");
  if (fs.existsSync(target) && fs.statSync(target).size === fs.statSync(source).size) return;
  fs.mkdirSync(path.dirname(target), { recursive: true });
  // Copy then rename, so a server reading the folder never sees half a file.
  const tmp = `${target}.${process.pid}.tmp`;
  fs.copyFileSync(source, tmp);
  fs.renameSync(tmp, target);
}
vendorPlotly();

const nextConfig: NextConfig = {
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
      {
        // Versioned file names: a new library version is a new address.
        source: "/vendor/:file*",
        headers: [{ key: "Cache-Control", value: "public, max-age=31536000, immutable" }],
      },
    ];
  },
};

export default nextConfig;
