import { PLOTLY_SRC } from "@/components/plots/plotly-script";
import { builtScripts } from "@/lib/web/built-scripts";
import { scriptWorkerSource } from "@/lib/web/script-worker";

// Read at run time: the build's chunks exist only once the build has finished.
export const dynamic = "force-dynamic";

/**
 * The worker's text, made on the first request of this process: a running server's build does not
 * change, and browsers ask for this file again on every full page load to look for a new version.
 */
let source: string | null = null;

/** The service worker (lib/web/script-worker.ts), at the root so that it may serve the whole app. */
export function GET() {
  source ??= scriptWorkerSource({ scripts: [PLOTLY_SRC, ...builtScripts()] });
  return new Response(source, {
    headers: { "Content-Type": "text/javascript; charset=utf-8", "Cache-Control": "no-cache" },
  });
}
