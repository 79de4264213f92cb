import { PLOTLY_SRC } from "@/components/plots/plotly-script";
import { builtScripts } from "@/lib/web/built-scripts";
import { scriptWorkerSource } from "@/lib/web/script-worker";

// Read at run time: the build's chunks exist only once the build has finished.
export const dynamic = "force-dynamic";

/** The service worker (lib/web/script-worker.ts), at the root so that it may serve the whole app. */
export function GET() {
  return new Response(scriptWorkerSource({ scripts: [PLOTLY_SRC, ...builtScripts()] }), {
    headers: { "Content-Type": "text/javascript; charset=utf-8", "Cache-Control": "no-cache" },
  });
}
