type PlotlyStatic = typeof import("plotly.js");

/**
 * The plotting library is served as one static classic script (`public/vendor/`, built by
 * scripts/plotly-vendor.ts with only the trace types Bandcross draws) instead of a bundler chunk,
 * so that
 *
 * - a page that plots names it in its `<head>` (React's `preinit`, see `Plot`) and the browser
 *   fetches and compiles it while the HTML and the page's own code are still arriving, off the main
 *   thread, rather than after hydration asks for a chunk;
 * - its address changes only with its content, so browsers and CDNs cache it for a year
 *   (`Cache-Control: immutable`, next.config.ts) and the browser can keep its compiled code.
 *
 * next.config.ts sets the address at build time; the unit tests' config sets one of its own.
 */
export const PLOTLY_SRC: string = process.env.BANDCROSS_PLOTLY_SRC ?? missingSrc();

function missingSrc(): never {
  throw new Error("BANDCROSS_PLOTLY_SRC is not set: next.config.ts sets it for the app");
}

let loading: Promise<PlotlyStatic> | null = null;
/** Failed loads in this document so far. */
let failures = 0;

/**
 * The address a new `<script>` loads: after a failure, the same file under a query the server
 * ignores. Chromium keeps a script that failed in its memory cache for the rest of the document
 * and answers a new element with the same address from there, with the same error and no request
 * (seen in Chromium 150), so a retry under the plain address could never succeed.
 */
const attemptSrc = () => (failures ? `${PLOTLY_SRC}?attempt=${failures + 1}` : PLOTLY_SRC);

/**
 * Whether the browser already tried this script and got no library back: a network error (status
 * 0, no body) or an HTTP error. The script `preinit` put in the head can fail before any code of
 * ours listens to it; its resource-timing entry is the only trace left.
 */
function failedEarlier(script: HTMLScriptElement): boolean {
  return (performance.getEntriesByName(script.src, "resource") as PerformanceResourceTiming[]).some(
    (e) => e.responseStatus >= 400 || (e.responseStatus === 0 && e.decodedBodySize === 0),
  );
}

/**
 * Resolves with the global `Plotly` once the script has run: at once when it has, else when the
 * `<script>` already in the page (from `preinit`) or one added here finishes. A script that had
 * already failed is replaced; a failed load rejects and is tried afresh, under a new address
 * (`attemptSrc`), on the next call.
 */
export function loadPlotly(): Promise<PlotlyStatic> {
  const w = window as unknown as { Plotly?: PlotlyStatic };
  if (w.Plotly) return Promise.resolve(w.Plotly);
  loading ??= new Promise<PlotlyStatic>((resolve, reject) => {
    let script = document.querySelector<HTMLScriptElement>(`script[src="${PLOTLY_SRC}"]`);
    if (script && failedEarlier(script)) {
      script.remove();
      script = null;
      failures++;
    }
    if (!script) {
      script = document.createElement("script");
      script.src = attemptSrc();
      script.async = true;
      document.head.appendChild(script);
    }
    const added = script;
    added.addEventListener(
      "load",
      () => (w.Plotly ? resolve(w.Plotly) : reject(new Error("the script ran without defining it"))),
      { once: true },
    );
    added.addEventListener(
      "error",
      () => {
        added.remove();
        failures++;
        reject(new Error("the download failed"));
      },
      { once: true },
    );
    // It may have finished between the check above and the listeners.
    if (w.Plotly) resolve(w.Plotly);
  }).catch((e: unknown) => {
    loading = null;
    throw e;
  });
  return loading;
}
