"use client";

import { pickedView, type ReviewView, type SpectrumData } from "./review-figure";

const LABEL: Record<ReviewView, string> = { raw: "Raw", feenstra: "(dI/dV)/(I/V)", setpoint: "÷ I_set/V_set" };
const VIEWS: ReviewView[] = ["raw", "feenstra", "setpoint"];

/** Why a view cannot be shown for this spectrum (null when it can). */
function unavailable(data: SpectrumData, v: ReviewView): string | null {
  return v === "raw" ? null : data.analysis.views[v].error;
}

/**
 * Raw, Feenstra-normalised or setpoint-normalised dI/dV, and the log scale: the view the pick was
 * made on is marked, and a view this spectrum cannot have says why on hover.
 */
export function ReviewViewSwitch(props: {
  data: SpectrumData;
  view: ReviewView;
  setView: (v: ReviewView) => void;
  logY: boolean;
  setLogY: (v: boolean) => void;
}) {
  const { data, view, setView, logY, setLogY } = props;
  const picked = pickedView(data);
  return (
    <div className="flex flex-wrap items-center gap-3 text-xs text-ink-soft">
      <div role="radiogroup" aria-label="View" className="inline-flex overflow-hidden rounded-md border border-line">
        {VIEWS.map((v) => {
          const why = unavailable(data, v);
          return (
            <button
              key={v}
              type="button"
              role="radio"
              aria-checked={view === v}
              disabled={why !== null}
              title={why ?? (v === picked ? "the gap was picked on this view" : undefined)}
              onClick={() => setView(v)}
              data-testid={`view-${v}`}
              className={
                "px-2.5 py-1 disabled:cursor-not-allowed disabled:opacity-50 " +
                (view === v ? "bg-ink text-white" : "bg-card hover:bg-line/50")
              }
            >
              {LABEL[v]}
              {v === picked ? " ✓" : ""}
            </button>
          );
        })}
      </div>
      <label className="inline-flex items-center gap-1.5">
        <input type="checkbox" checked={logY} onChange={(e) => setLogY(e.target.checked)} /> log scale
      </label>
    </div>
  );
}

/** The words under the plot: what the shown view is, and whether the pick was read on it. */
export function ViewCaption({ data, view }: { data: SpectrumData; view: ReviewView }) {
  const picked = pickedView(data);
  const words = view === "raw" ? "raw dI/dV, as recorded" : (data.analysis.views[view].description ?? "");
  // The rebuilt current is in the words already; other warnings (a current offset removed) follow them.
  const warnings = view === "raw" ? [] : data.analysis.views[view].warnings.filter((w) => !w.startsWith("no current column"));
  return (
    <p className="px-2 pt-1 text-xs text-muted" data-testid="view-caption">
      Shown: {words}.{" "}
      {view === picked
        ? "The gap was picked on this view."
        : `The gap was picked on ${picked === "raw" ? "raw dI/dV" : data.analysis.pickedOn.description}.`}
      {warnings.length ? ` ${warnings.join("; ")}.` : ""}
    </p>
  );
}
