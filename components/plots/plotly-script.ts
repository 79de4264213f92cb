import plotlyPackage from "plotly.js-dist-min/package.json";

type PlotlyStatic = typeof import("plotly.js-dist-min");

/**
 * The plotting library is served as one static, versioned classic script (`public/vendor/`, copied
 * from the installed `plotly.js-dist-min` by next.config.ts) instead of a bundler chunk, so that
 *
 * - a page that plots names it in its `<head>` (React's `preinit`, see `Plot`) and the browser
 *   fetches and compiles it while the HTML and the page's own code are still arriving, off the main
 *   thread, rather than after hydration asks for a chunk;
 * - its address changes only with the library's version, so browsers and CDNs cache it for a year
 *   (`Cache-Control: immutable`, next.config.ts) and the browser can keep its compiled code.
 */
export const PLOTLY_SRC = `/vendor/plotly-${plotlyPackage.version}.min.js`;

let loading: Promise<PlotlyStatic> | null = null;

/**
 * Resolves with the global `Plotly` once the script has run: at once when it has, else when the
 * `<script>` already in the page (from `preinit`) or one added here finishes. A failed load
 * rejects and is retried on the next call.
 */
export function loadPlotly(): Promise<PlotlyStatic> {
  const w = window as unknown as { Plotly?: PlotlyStatic };
  if (w.Plotly) return Promise.resolve(w.Plotly);
  loading ??= new Promise<PlotlyStatic>((resolve, reject) => {
    let script = document.querySelector<HTMLScriptElement>(`script[src="${PLOTLY_SRC}"]`);
    if (!script) {
      script = document.createElement("script");
      script.src = PLOTLY_SRC;
      script.async = true;
      document.head.appendChild(script);
    }
    const done = () => (w.Plotly ? resolve(w.Plotly) : reject(new Error("the plotting library did not load")));
    script.addEventListener("load", done, { once: true });
    script.addEventListener(
      "error",
      () => {
        script.remove();
        reject(new Error("the plotting library could not be downloaded"));
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
