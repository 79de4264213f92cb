import { Notice } from "@/components/ui/card";
import { counted } from "@/lib/format";
import type { SampleVersions } from "./sample-queries";

/**
 * Progress of the background re-analysis that a saved version started: the spectra, then the refit
 * of the critical field as the last step, so the bar is full only when the work has ended.
 */
export function RunProgress({ run }: { run: SampleVersions["run"] }) {
  if (!run) return null;
  if (run.status === "done")
    return (
      <p className="text-xs text-muted">
        Last re-analysis ({run.reason}) finished: {counted(run.done, "spectrum", "spectra")} and the critical field.
      </p>
    );
  if (run.status === "failed")
    return <Notice tone="danger">{run.message ?? `The re-analysis (${run.reason}) stopped.`}</Notice>;
  const pct = Math.round((100 * run.done) / (run.total + 1));
  const step =
    run.status === "queued"
      ? "queued"
      : run.status === "fitting"
        ? `${run.total} of ${run.total} spectra; refitting the critical field…`
        : `${run.done} of ${run.total} spectra`;
  return (
    <div aria-live="polite" data-testid="reanalysis-progress" data-status={run.status}>
      <p className="text-xs text-ink-soft">
        Re-analysing ({run.reason}): {step}
      </p>
      <div
        className="mt-1 h-1.5 overflow-hidden rounded-full bg-line"
        role="progressbar"
        aria-valuenow={pct}
        aria-valuemin={0}
        aria-valuemax={100}
        aria-label="Re-analysis progress"
      >
        <div className="h-full bg-teal transition-[width]" style={{ width: `${pct}%` }} />
      </div>
    </div>
  );
}
