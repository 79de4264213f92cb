import "server-only";
import fs from "node:fs";
import path from "node:path";

/**
 * The JavaScript chunks of the build under `root`, as the browser asks for them:
 * `/_next/static/chunks/…`. Their names carry a content hash, so each address always serves the
 * same bytes. Read from the build output (`.next/static`, the folder a deployment serves or uploads
 * to its CDN); none when there is no build (tests, `next dev`).
 */
export function builtScripts(root = process.cwd()): string[] {
  try {
    return fs
      .readdirSync(path.join(root, ".next", "static", "chunks"), { recursive: true, encoding: "utf8" })
      .filter((n) => n.endsWith(".js"))
      .map((n) => `/_next/static/chunks/${n.split(path.sep).join("/")}`)
      .sort();
  } catch {
    return [];
  }
}
