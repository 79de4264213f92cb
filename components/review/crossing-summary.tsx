"use client";

import { CrossingBadge } from "@/components/ui/badge";
import { deltaBicInWords, formatUtc } from "@/lib/format";
import { outOfFit } from "./phase-figure";
import type { PhaseData } from "./phase-plot";
import { usePhaseOf } from "./sample-queries";

type Summary = { crossing: PhaseData["crossing"]; nIncluded: number };
const summaryOf = (d: PhaseData): Summary => ({
  crossing: d.crossing,
  nIncluded: d.points.filter((p) => !outOfFit(p)).length,
});

/** The comparison in words, its number kept on one line ("ΔBIC = 20,272" broke after "ΔBIC"). */
function DeltaBic({ value }: { value: number }) {
  const words = deltaBicInWords(value);
  const at = words.indexOf(":");
  return (
    <span data-testid="delta-bic">
      <span className="whitespace-nowrap">{words.slice(0, at)}</span>
      {words.slice(at)}
    </span>
  );
}

/**
 * The critical field as a reader should see it: value, interval, state, evidence, the versions the
 * fit was made with, and whether an analyst confirmed it. It reads the phase plot's query, so the
 * card and the plot always show the same fit.
 */
export function CrossingSummary({ lab, sampleId, initial }: { lab: string; sampleId: string; initial: Summary }) {
  const { crossing: c, nIncluded } = usePhaseOf(lab, sampleId, summaryOf, initial);
  const comparison = "comparison" in c ? (c.comparison as { deltaBic?: number; preferred?: string } | null) : null;
  return (
    <div className="space-y-3" data-testid="crossing-summary">
      <div className="flex items-center gap-2">
        <CrossingBadge state={c.state} status={"status" in c ? c.status : null} />
        {"status" in c && c.status === "confirmed" ? (
          <span className="text-xs text-ok">✓ confirmed by an analyst</span>
        ) : c.state === "crossed" ? (
          <span className="text-xs text-muted">candidate — not yet confirmed</span>
        ) : null}
      </div>
      {c.state === "crossed" && c.field_V_per_nm != null ? (
        <div>
          <p className="text-xs uppercase tracking-wide text-muted">critical field (estimate)</p>
          <p className="num text-3xl font-medium text-ink" data-testid="critical-field">
            {c.field_V_per_nm.toFixed(3)} <span className="text-base text-ink-soft">V/nm</span>
          </p>
          {c.ci95_V_per_nm ? (
            <p className="num text-sm text-ink-soft" data-testid="critical-field-ci">
              95% interval [{c.ci95_V_per_nm[0].toFixed(3)}, {c.ci95_V_per_nm[1].toFixed(3)}] V/nm
            </p>
          ) : null}
          {"ci95Statistical_V_per_nm" in c && c.ci95Statistical_V_per_nm ? (
            <p className="num text-xs text-muted">
              from the scatter of the points alone: [{c.ci95Statistical_V_per_nm[0].toFixed(3)},{" "}
              {c.ci95Statistical_V_per_nm[1].toFixed(3)}]; the wider interval adds the work-function and
              contact-distance uncertainties, which shift every field together
            </p>
          ) : null}
        </div>
      ) : c.state === "closing" ? (
        <div>
          <p className="text-sm text-ink">The gap shrinks with field but has not reopened within the measured range.</p>
          {"extrapolated_V_per_nm" in c && c.extrapolated_V_per_nm != null ? (
            <p className="num mt-1 text-sm text-ink-soft">
              straight-line extrapolation to zero gap: {c.extrapolated_V_per_nm.toFixed(2)} V/nm (beyond the data; not a
              crossing)
            </p>
          ) : null}
        </div>
      ) : (
        <p className="text-sm text-ink-soft">
          {nIncluded < 4
            ? "Too few spectra with a gap and a field for a fit."
            : "No closing of the gap that a fit can support."}
        </p>
      )}
      {"slopes" in c && c.slopes ? (
        <p className="num text-xs text-ink-soft">
          slopes dΔ/dE: {(c.slopes.below * 1000).toFixed(0)} meV per V/nm below,{" "}
          {((c.slopes.above ?? 0) * 1000).toFixed(0)} above
        </p>
      ) : null}
      {comparison?.deltaBic != null ? (
        <p className="text-xs text-ink-soft">
          model comparison, V-shape versus straight line: <DeltaBic value={comparison.deltaBic} />{" "}
          <span className="text-muted">
            (the line&apos;s BIC minus the V&apos;s: above 0 favours the V, 6 or more strongly)
          </span>
        </p>
      ) : null}
      {"n" in c ? (
        <p className="text-xs text-muted">
          {c.n} spectra in the fit · fitted{" "}
          {"fittedAt" in c && c.fittedAt ? formatUtc(c.fittedAt) : ""}
        </p>
      ) : null}
      {"settingsVersion" in c ? (
        <p className="num text-xs text-muted" data-testid="crossing-versions">
          fitted with extraction settings v{c.settingsVersion ?? "?"}, field model v{c.fieldModelVersion ?? "?"}
        </p>
      ) : null}
      {"kappaSource" in c && c.kappaSource ? (
        <p className="num text-xs text-muted" data-testid="crossing-kappa-source">
          {c.kappaSource}
        </p>
      ) : null}
    </div>
  );
}
