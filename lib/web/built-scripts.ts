import "server-only";
import fs from "node:fs";
import path from "node:path";

/**
 * The JavaScript chunks of this build, as the browser asks for them: `/_next/static/chunks/…`.
 * Their names carry a content hash, so each address always serves the same bytes. Read once per
 * process from the build output (`.next/static`, the folder a deployment serves or uploads to its
 * CDN); none when there is no build (tests, `next dev`).
 */
let built: string[] | null = null;

export function builtScripts(root = process.cwd()): string[] {
  if (built && root === process.cwd()) return built;
  const dir = path.join(root, ".next", "static", "chunks");
  let names: string[] = [];
  try {
    names = fs
      .readdirSync(dir, { recursive: true, encoding: "utf8" })
      .filter((n) => n.endsWith(".js"))
      .map((n) => `/_next/static/chunks/${n.split(path.sep).join("/")}`)
      .sort();
  } catch {
    names = [];
  }
  if (root === process.cwd()) built = names;
  return names;
}
