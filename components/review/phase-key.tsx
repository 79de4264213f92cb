import { PHASE_LOOK, phaseCounts, type PhaseData } from "./phase-figure";

/**
 * How to read the plot, under it: how many points are automatic picks, corrected by an analyst or
 * excluded, each with the marker shape it has on the plot, how many carry a quality flag (ringed)
 * and how many the lab's setting left out of the fit for that, how many automatic picks an analyst
 * accepted as they are, what the field model's bar means, and what a click does.
 */
export function PhaseKey({ points, modelBar }: { points: PhaseData["points"]; modelBar: boolean }) {
  const { auto, corrected, excluded, excludedByFlag, flagged, accepted } = phaseCounts(points);
  return (
    <dl
      className="flex flex-wrap gap-x-5 gap-y-1 border-t border-line pt-3 text-xs text-ink-soft"
      data-testid="phase-key"
    >
      <div className="inline-flex items-center gap-1.5">
        <dt>
          <span aria-hidden>●</span> automatic picks
        </dt>
        <dd className="num text-ink">{auto}</dd>
      </div>
      <div className="inline-flex items-center gap-1.5">
        <dt>
          <span aria-hidden>◆</span> corrected by an analyst
        </dt>
        <dd className="num text-ink">{corrected}</dd>
      </div>
      <div className="inline-flex items-center gap-1.5">
        <dt>
          <span aria-hidden>✕</span> excluded (not in the fit)
        </dt>
        <dd className="num text-ink">{excluded}</dd>
      </div>
      <div className="inline-flex items-center gap-1.5" data-testid="phase-key-flagged" title={FLAG_HELP}>
        <dt>
          <span
            aria-hidden
            className="inline-block h-3 w-3 translate-y-0.5 rounded-full border-[1.5px]"
            style={{ borderColor: PHASE_LOOK.flagRing }}
          />{" "}
          ringed: flagged
        </dt>
        <dd className="num text-ink">{flagged}</dd>
      </div>
      {excludedByFlag ? (
        <div className="inline-flex items-center gap-1.5" data-testid="phase-key-flagged-out">
          <dt>
            <span aria-hidden>○</span> flagged, left out of the fit (lab setting)
          </dt>
          <dd className="num text-ink">{excludedByFlag}</dd>
        </div>
      ) : null}
      <div className="inline-flex items-center gap-1.5">
        <dt>
          <span aria-hidden>✓</span> of the automatic picks, accepted by an analyst
        </dt>
        <dd className="num text-ink" data-testid="phase-key-accepted">
          {accepted}
        </dd>
      </div>
      <p className="basis-full text-muted">
        Click a point to open its spectrum. The field axis is a model estimate: its assumptions are beside the plot.
        {modelBar ? ` ${MODEL_BAR_HELP}` : null}
      </p>
    </dl>
  );
}

const FLAG_HELP =
  "A ring marks a pick with a quality flag: a reason it may not be trusted. Open the spectrum to read why.";

/** What the one bar at the top of the plot means (the points carry the gap's error bars only). */
export const MODEL_BAR_HELP =
  "The bar at the top is the field model's uncertainty (work functions, contact distance): it moves every point " +
  "together, so it is drawn once rather than on each point, and it widens the light band of the critical field.";
