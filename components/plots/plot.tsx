"use client";

import {
  type ComponentType,
  type ReactNode,
  useEffect,
  useLayoutEffect,
  useMemo,
  useRef,
  useState,
  useSyncExternalStore,
} from "react";
import { preinit } from "react-dom";
import createPlotlyComponent, { type PlotParams } from "react-plotly.js/factory";
import { downloadFigure, fileName } from "./download";
import { loadPlotly, PLOTLY_SRC } from "./plotly-script";

/**
 * react-plotly's component around the global from the versioned static script
 * (`plotly-script.ts`), made once per page; the bundler never carries the library.
 */
interface Loaded {
  Plotly: Awaited<ReturnType<typeof loadPlotly>>;
  Component: ComponentType<PlotParams>;
  /**
   * The camera button, made once: Plotly compares configs on every update, and a new click
   * function each render made it draw the whole figure again (0.3-1 s for 5,000 WebGL points).
   */
  modeBarButtonsToAdd: object[];
}
/** Made once per page: a figure mounted after the library has run draws in its first commit. */
let ready: Loaded | null = null;

function makeLoaded(Plotly: Loaded["Plotly"]): Loaded {
  ready ??= {
    Plotly,
    Component: createPlotlyComponent(Plotly) as ComponentType<PlotParams>,
    modeBarButtonsToAdd: [
      {
        name: "figure-png",
        title: "Download the figure as PNG",
        icon: Plotly.Icons.camera,
        // The plot's own config (its file name) is on the graph div.
        click: (gd: HTMLElement & { _context?: unknown }) =>
          void downloadFigure(gd, {
            format: "png",
            filename: fileName(gd._context),
            width: gd.clientWidth,
            height: gd.clientHeight,
          }),
      },
    ],
  };
  return ready;
}

/** True while React hydrates server-rendered HTML (its server snapshot), false in a render on the client. */
const noSubscription = () => () => {};
const notHydrating = () => false;
const isHydrating = () => true;

/** The component at once when the library's script has already run (it usually has by hydration), else null. */
function loadedNow(): Loaded | null {
  const Plotly =
    typeof window === "undefined" ? undefined : (window as unknown as { Plotly?: Loaded["Plotly"] }).Plotly;
  return ready ?? (Plotly ? makeLoaded(Plotly) : null);
}

/**
 * The component once the library has run. The factory (a few kB) is bundled, not a chunk of its
 * own, so nothing else is fetched; `loadPlotly` shares one download between callers and forgets a
 * failed one, so the next call starts afresh.
 */
const loadComponent = (): Promise<Loaded> => loadPlotly().then(makeLoaded);

/**
 * WebGL traces draw into canvases of (plot size × this ratio); Plotly's default of 2 quadruples the
 * pixels on an ordinary screen, and creating and clearing those buffers was half of a 5,000-point
 * phase plot's first draw in chromium without a GPU. The screen's own ratio, between 1 and 2.
 */
function glPixelRatio(): number {
  return typeof window === "undefined" ? 1 : Math.min(2, Math.max(1, window.devicePixelRatio || 1));
}

/** Where the figure would be, when the library could not be loaded: a message and a retry. */
const FAILED_BOX = [
  "absolute inset-0 flex flex-col items-center justify-center gap-2",
  "rounded-lg border border-dashed border-line bg-card p-4 text-center text-sm text-ink-soft",
].join(" ");

/**
 * A Plotly figure in the browser. Rendering it (on the server too) names the library's script in
 * the page head. Until the figure has drawn, `placeholder` (a still drawing, say) or a skeleton
 * stands in its place; if the library cannot be loaded, a message with a retry does.
 */
export function Plot({ placeholder, ...props }: Omit<PlotParams, "useResizeHandler"> & { placeholder?: ReactNode }) {
  preinit(PLOTLY_SRC, { as: "script", fetchPriority: "high" });
  const [loaded, setLoaded] = useState<Loaded | { error: Error } | null>(null);
  const [attempt, setAttempt] = useState(0);
  const hydrating = useSyncExternalStore(noSubscription, notHydrating, isHydrating);
  const box = useRef<HTMLDivElement>(null);
  /** The graph div, once Plotly has drawn into it. */
  const [graph, setGraph] = useState<HTMLElement | null>(null);
  const Plotly = loaded && "Plotly" in loaded ? loaded.Plotly : null;
  // The figure follows its box, whatever changes the box's size (the window, a side panel, the
  // page's grid). Plotly sizes a new figure to its box, so only a later change redraws, once per
  // frame at most; react-plotly's own handler relaid every new figure out a second time (~80 ms
  // for the 5,000-point phase plot) and heard only the window.
  useEffect(() => {
    const el = box.current;
    if (!graph || !Plotly || !el) return;
    let size = `${el.clientWidth}x${el.clientHeight}`;
    let frame = 0;
    const observer = new ResizeObserver(() => {
      const now = `${el.clientWidth}x${el.clientHeight}`;
      if (now === size) return;
      size = now;
      cancelAnimationFrame(frame);
      frame = requestAnimationFrame(() => void Plotly.Plots.resize(graph));
    });
    observer.observe(el);
    return () => {
      observer.disconnect();
      cancelAnimationFrame(frame);
    };
  }, [graph, Plotly]);
  // A figure that hydrates with the page is already on screen as its placeholder: it is drawn in
  // the hydration's own commit when the library is there, not after a paint and the scheduler's
  // later turns. One mounted by a client navigation is drawn after the new page has painted, so
  // the page and its placeholder show first (drawing in that commit made the list-to-sample
  // case 0.2-0.4 s slower to reach the screen).
  const [viaHydration] = useState(hydrating);
  const start = () => {
    const now = loadedNow();
    if (now) {
      setLoaded(now);
      return;
    }
    let live = true;
    loadComponent().then(
      (l) => live && setLoaded(l),
      (error: Error) => live && setLoaded({ error }),
    );
    return () => {
      live = false;
    };
  };
  useLayoutEffect(() => (viaHydration ? start() : undefined), [attempt]);
  useEffect(() => (viaHydration ? undefined : start()), [attempt]);
  // The same object while the caller's config says the same: react-plotly runs Plotly.react
  // whenever data, layout or config is a new object, and callers write their config inline, so a
  // fresh one on every render (this component's own state, a caller's refetch flag) redrew the
  // figure. Callers' configs are plain data, compared by their JSON.
  const modeBar = loaded && "Component" in loaded ? loaded.modeBarButtonsToAdd : null;
  const callerConfig = JSON.stringify(props.config ?? {});
  const config = useMemo(
    () => ({
      plotGlPixelRatio: glPixelRatio(),
      // The camera button writes the file with downloadFigure, as the pages' own buttons do.
      modeBarButtonsToRemove: ["toImage"],
      modeBarButtonsToAdd: modeBar,
      ...(JSON.parse(callerConfig) as Record<string, unknown>),
    }),
    [modeBar, callerConfig],
  );
  return (
    <div ref={box} className="relative h-full w-full">
      {loaded && "Component" in loaded ? (
        <loaded.Component
          {...props}
          config={config}
          useResizeHandler={false}
          onInitialized={(figure, gd) => {
            setGraph(gd);
            props.onInitialized?.(figure, gd);
          }}
        />
      ) : null}
      {loaded && "error" in loaded ? (
        <div role="alert" className={FAILED_BOX}>
          <p>The plotting library could not be loaded: {loaded.error.message}.</p>
          <button
            type="button"
            className="rounded border border-line bg-white px-3 py-1 text-ink hover:border-ink-soft"
            onClick={() => {
              setLoaded(null);
              setAttempt((n) => n + 1);
            }}
          >
            Retry
          </button>
        </div>
      ) : !graph ? (
        (placeholder ?? (
          <div className="absolute inset-0 animate-pulse rounded-lg bg-line/50" aria-label="Loading the plot" />
        ))
      ) : null}
    </div>
  );
}

export { axis, baseLayout, COLORS, PLOT_FONT, PLOT_STYLE } from "./look";
export { downloadFigure } from "./download";
