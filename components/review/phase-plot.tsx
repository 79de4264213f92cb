"use client";

import { useRouter } from "next/navigation";
import { type ReactNode, useMemo, useRef, useState } from "react";
import { downloadFigure, Plot } from "@/components/plots/plot";
import { fileStem } from "@/lib/format";
import { GapHistogram } from "./gap-histogram";
import { TheoryControls, useMedia } from "./phase-controls";
import { NARROW_QUERY, outOfFit, type PhaseData } from "./phase-figure";
import { fieldModelBar } from "./field-model-bar";
import { PhaseKey } from "./phase-key";
import { type PackedPhase, unpackPhase } from "./phase-pack";
import { PhasePreview } from "./phase-preview";
import { phaseFigure, type Theory, type XMode } from "./phase-traces";
import { usePhase } from "./sample-queries";

export type { PhaseData };

const EMPTY_BOX = [
  "flex h-72 items-center justify-center",
  "rounded-lg border border-dashed border-line text-sm text-muted",
].join(" ");
const MODE_OFF = "text-ink-soft hover:bg-paper";

/** The plot's height on a wide screen, px (on a narrow one, this and its legend's rows). */
const PLOT_PX = 440;

/** What a plot of the sample hands the frame: the graph div once drawn (for the PNG and SVG buttons). */
type GraphRef = { current: HTMLElement | null };

/**
 * The sample's main plot. Gap versus estimated field; or, when every spectrum sits at one field
 * (`sharedField`, a grid at one setpoint), a histogram of the gaps that points to the gap map, as a
 * column of points at one field would say nothing. Both share the frame: refresh state, the figure
 * buttons and the show-excluded switch.
 */
export function PhasePlot({
  lab,
  sampleId,
  initial: packed,
  gapMap = false,
}: {
  lab: string;
  sampleId: string;
  initial: PackedPhase;
  gapMap?: boolean;
}) {
  const initial = useMemo(() => unpackPhase(packed), [packed]);
  const { data = initial, isFetching, isError, refetch } = usePhase(lab, sampleId, initial);
  const [showExcluded, setShowExcluded] = useState(true);
  const graph = useRef<HTMLElement | null>(null);
  const histogram = data.sharedField != null && data.points.length > 0;
  const filename = fileStem(`${data.sample.name} ${histogram ? "gap histogram" : "phase"}`);
  const download = (format: "png" | "svg") => {
    if (graph.current) void downloadFigure(graph.current, { format, filename, width: 1200, height: 800 });
  };
  // The controls row: the plot's own controls around the show-excluded switch, then refresh state and files.
  const frame = (before: ReactNode, after: ReactNode) => (
    <div className="flex flex-wrap items-center gap-3 text-sm">
      {before}
      <label className="inline-flex items-center gap-1.5 text-xs text-ink-soft">
        <input type="checkbox" checked={showExcluded} onChange={(e) => setShowExcluded(e.target.checked)} /> show
        excluded
      </label>
      {after}
      <span className="ml-auto flex items-center gap-2 text-xs text-muted">
        {isFetching ? "updating…" : `${data.points.length} spectra`}
        {data.points.length
          ? (["png", "svg"] as const).map((f) => (
              <button
                key={f}
                type="button"
                className="rounded border border-line bg-white px-2 py-0.5 hover:border-ink-soft"
                onClick={() => download(f)}
              >
                {f.toUpperCase()}
              </button>
            ))
          : null}
      </span>
    </div>
  );
  return (
    <div
      className="space-y-3"
      data-testid="phase-plot"
      data-points={data.points.length}
      data-state={data.crossing.state}
      data-view={histogram ? "histogram" : "field"}
    >
      {isError ? (
        <p className="text-sm text-danger">
          The phase data could not be refreshed.{" "}
          <button className="underline" type="button" onClick={() => refetch()}>
            Retry
          </button>
        </p>
      ) : null}
      {data.points.length === 0 ? (
        <>
          {frame(null, null)}
          <div className={EMPTY_BOX}>
            No spectra with a gap and a field yet: upload a session&apos;s spectra, and tag setpoints where the files
            lack them.
          </div>
        </>
      ) : histogram ? (
        <>
          {frame(null, null)}
          <GapHistogram data={data} showExcluded={showExcluded} gapMap={gapMap} filename={filename} graph={graph} />
        </>
      ) : (
        <FieldPlot
          lab={lab}
          sampleId={sampleId}
          data={data}
          showExcluded={showExcluded}
          filename={filename}
          graph={graph}
          frame={frame}
        />
      )}
    </div>
  );
}

/**
 * Gap versus estimated field (or distance, or setpoint conductance): points by region with their
 * gap's error bars, corrected picks as diamonds and excluded spectra as open crosses (shape, not
 * only colour), the fitted V with its 95% band, the critical field with its interval, the field
 * model's shared uncertainty as one bar, and an optional theory overlay. Clicking a point opens
 * that spectrum.
 */
function FieldPlot(props: {
  lab: string;
  sampleId: string;
  data: PhaseData;
  showExcluded: boolean;
  filename: string;
  graph: GraphRef;
  frame: (before: ReactNode, after: ReactNode) => ReactNode;
}) {
  const { lab, sampleId, data, showExcluded, filename, graph, frame } = props;
  const router = useRouter();
  const [mode, setMode] = useState<XMode>("field");
  const [theory, setTheory] = useState<Theory>({ on: false, lambda_meV: "43", ell_A: "0.33" });
  const narrow = useMedia(NARROW_QUERY);
  const figure = useMemo(
    () => phaseFigure(data, { mode, showExcluded, theory, narrow, sampleId }),
    [data, mode, showExcluded, theory, narrow, sampleId],
  );
  const shown = showExcluded ? data.points : data.points.filter((p) => !outOfFit(p));
  return (
    <>
      {frame(
        <div role="radiogroup" aria-label="x axis" className="inline-flex rounded-md border border-line bg-white p-0.5">
          {(["field", "distance", "conductance"] as XMode[]).map((m) => (
            <button
              key={m}
              type="button"
              role="radio"
              aria-checked={mode === m}
              onClick={() => setMode(m)}
              className={`rounded px-2.5 py-1 text-xs font-medium ${mode === m ? "bg-ink text-white" : MODE_OFF}`}
            >
              {m === "field" ? "Field" : m === "distance" ? "Distance" : "Setpoint conductance"}
            </button>
          ))}
        </div>,
        <TheoryControls theory={theory} onChange={setTheory} />,
      )}
      {/* On a phone the box grows by the legend's rows (a media query: the page is drawn before its width
          is known). */}
      <div
        className="h-[440px] w-full max-sm:h-(--phase-h)"
        style={{ ["--phase-h" as string]: `${PLOT_PX + figure.legendRoom}px` }}
      >
        <Plot
          data={figure.data}
          layout={figure.layout}
          config={{ displaylogo: false, toImageButtonOptions: { filename } }}
          style={{ width: "100%", height: "100%" }}
          // Until Plotly has drawn, a still drawing of the same figure stands in its place.
          placeholder={
            figure.ranges ? (
              <PhasePreview
                data={data}
                showExcluded={showExcluded}
                ranges={figure.ranges}
                legendRoom={figure.legendRoom}
              />
            ) : undefined
          }
          onInitialized={(_f, gd) => (graph.current = gd)}
          onUpdate={(_f, gd) => (graph.current = gd)}
          onClick={(e: { points?: { customdata?: string }[] }) => {
            const id = e.points?.[0]?.customdata;
            if (typeof id === "string") router.push(`/labs/${lab}/spectra/${id}`);
          }}
        />
      </div>
      <PhaseKey points={data.points} modelBar={mode === "field" && fieldModelBar(shown) != null} />
    </>
  );
}
