import Link from "next/link";
import { Suspense } from "react";
import { CrossingTimeline } from "@/components/alerts/crossing-timeline";
import { WatchToggle } from "@/components/alerts/watch-toggle";
import { CrossingSummary } from "@/components/review/crossing-summary";
import { FieldModelCard } from "@/components/review/field-model-card";
import type { SampleVersions } from "@/components/review/sample-queries";
import { packPhase } from "@/components/review/phase-pack";
import { outOfFit } from "@/components/review/phase-figure";
import { PhasePlotTitle } from "@/components/review/phase-controls";
import { PhasePlot } from "@/components/review/phase-plot";
import { SettingsEditors } from "@/components/review/settings-editors";
import { ButtonLink } from "@/components/ui/button";
import { Card, EmptyState, PageHeader } from "@/components/ui/card";
import { pageCtx, pageSample } from "@/lib/actions/validated";
import { can } from "@/lib/base/permissions";
import { loadSampleAnalysis } from "@/lib/services/analysis/loadSampleAnalysis";
import { getSampleVersions } from "@/lib/services/analysis/getSampleVersions";
import { listSessions } from "@/lib/services/sessions/listSessions";
import { tipsOfSample } from "@/lib/services/tips/tipsOfSample";
import { getPhaseJson } from "@/lib/services/spectra/getPhaseJson";
import type { PhaseData } from "@/components/review/phase-plot";
import { getGapMap } from "@/lib/services/spectra/getGapMap";
import { GapMap } from "@/components/review/gap-map";

/** The wide layout's two columns: the plot's, which may shrink (a plot holds its width otherwise), and the cards'. */
const PAGE_GRID = "xl:grid-cols-[minmax(0,2.2fr)_minmax(280px,1fr)]";

export default async function SamplePage({ params }: { params: Promise<{ lab: string; sampleId: string }> }) {
  const { lab, sampleId } = await params;
  const ctx = await pageCtx(lab);
  const s = await pageSample(lab, sampleId);
  const [sessions, phase, versions, analysis, map, usedTips] = await Promise.all([
    listSessions({ ctx, input: { sampleId: s.id } }),
    // The same cached JSON the phase endpoint serves (a 5,000-spectrum sample is built once, not per visit).
    getPhaseJson({ ctx, input: { sampleId: s.id } }).then((r) => JSON.parse(r.body!) as PhaseData),
    getSampleVersions({ ctx, input: { sampleId: s.id } }),
    loadSampleAnalysis({ ctx, input: { sampleId: s.id } }),
    getGapMap({ ctx, input: { sampleId: s.id } }),
    tipsOfSample({ ctx, input: { sampleId: s.id } }),
  ]);
  const model = analysis.modelFor(usedTips[0] ?? null);
  // In the fit: neither excluded by hand nor left out for its flags by the lab's setting.
  const included = phase.points.filter((p) => !outOfFit(p)).length;
  // What the versions query starts from (the cards that read it: settings, field model).
  const initialVersions: SampleVersions = {
    settings: {
      id: versions.settings.id,
      version: versions.settings.version,
      settings: versions.settings.settings,
      createdAt: versions.settings.createdAt.toISOString(),
    },
    fieldModel: {
      id: versions.field.id,
      version: versions.field.version,
      model: versions.field.model,
      createdAt: versions.field.createdAt.toISOString(),
    },
    run: versions.run
      ? {
          id: versions.run.id,
          status: versions.run.status,
          total: versions.run.total,
          done: versions.run.done,
          reason: versions.run.reason,
          message: versions.run.message,
        }
      : null,
    curveChoices: versions.curveChoices,
    fittedCurves: versions.fittedCurves,
  };
  const ev = (v: number, sigma: number) => `${v.toFixed(2)} ± ${sigma.toFixed(2)} eV`;
  const tipOf = (t: (typeof usedTips)[number]) => `${ev(t.workFunctionEv, t.workFunctionSigmaEv)} (${t.label})`;
  const tipText = usedTips.length
    ? usedTips.map(tipOf).join("; ")
    : `${model.tipWorkFunction_eV} ± ${model.tipWorkFunctionSigma_eV} eV (lab default)`;
  const workFunction = ev(s.workFunctionEv, s.workFunctionSigmaEv);
  // Rows of the wide layout's left column: the plot, the gap map if any, the settings.
  const rows = map.grids.length
    ? { grid: "xl:grid-rows-[auto_auto_1fr]", side: "xl:row-span-3" }
    : { grid: "xl:grid-rows-[auto_1fr]", side: "xl:row-span-2" };
  return (
    <>
      <PageHeader
        eyebrow="Sample"
        title={s.name}
        description={`${s.material}${s.substrate ? ` on ${s.substrate}` : ""} · sample work function ${workFunction}`}
        actions={
          <>
            <WatchToggle lab={lab} sampleId={s.id} />
            {phase.points.length ? (
              <ButtonLink href={`/labs/${lab}/spectra/${phase.points[0].spectrumId}`} variant="accent">
                Review spectra
              </ButtonLink>
            ) : null}
            {can(ctx.actor.role, "session:write") ? (
              <ButtonLink href={`/labs/${lab}/sessions/new?sample=${s.id}`} variant="secondary">
                New session
              </ButtonLink>
            ) : null}
            {can(ctx.actor.role, "sample:write") ? (
              <ButtonLink href={`/labs/${lab}/samples/${s.id}/edit`} variant="secondary">
                Edit
              </ButtonLink>
            ) : null}
          </>
        }
      />
      {/* One grid: on wide screens the phase plot, the gap map and the settings stack on the left
          and the side cards span the right, so neither column leaves a gap (the last row is the
          flexible one, so the side cards' height goes there, not under the plot); on narrow
          screens the side cards (the critical field first) follow the plot. */}
      <div className={`grid grid-cols-1 gap-5 ${PAGE_GRID} xl:items-start ${rows.grid}`}>
        <Card
          title={
            <PhasePlotTitle
              lab={lab}
              sampleId={s.id}
              initialHistogram={phase.sharedField != null && phase.points.length > 0}
            />
          }
        >
          <PhasePlot lab={lab} sampleId={s.id} initial={packPhase(phase)} gapMap={map.grids.length > 0} />
        </Card>
        {/* Boundaries of their own: React hydrates them after the plot's part of the page, so the
            plot starts drawing sooner; a click in one before then hydrates it at once. */}
        <Suspense>
          <div className={`space-y-5 xl:col-start-2 xl:row-start-1 ${rows.side}`}>
            <Card title="Critical field">
              <CrossingSummary lab={lab} sampleId={s.id} initial={{ crossing: phase.crossing, nIncluded: included }} />
            </Card>
            <CrossingTimeline lab={lab} sampleId={s.id} initialCrossing={phase.crossing} />
            <Card title="How the field is estimated">
              <FieldModelCard lab={lab} sampleId={s.id} initial={initialVersions} model={model} tipText={tipText} />
            </Card>
            <Card title="Export for a paper">
              <ul className="space-y-2 text-sm" data-testid="exports">
                <li>
                  <a
                    className="font-medium text-copper underline-offset-2 hover:underline"
                    href={`/api/v1/samples/${s.id}/export?format=phase-csv&lab=${lab}`}
                    download
                  >
                    Phase data (CSV)
                  </a>{" "}
                  <span className="text-xs text-muted">
                    every point with its field model and settings versions and raw-file hash
                  </span>
                </li>
                <li>
                  <a
                    className="font-medium text-copper underline-offset-2 hover:underline"
                    href={`/api/v1/samples/${s.id}/export?format=spectra-csv&lab=${lab}`}
                    download
                  >
                    Spectra (CSV)
                  </a>{" "}
                  <span className="text-xs text-muted">bias and dI/dV of every spectrum</span>
                </li>
                <li>
                  <a
                    className="font-medium text-copper underline-offset-2 hover:underline"
                    href={`/api/v1/samples/${s.id}/export?format=json&lab=${lab}`}
                    download
                  >
                    Everything (JSON)
                  </a>{" "}
                  <span className="text-xs text-muted">points, fit, settings and field model</span>
                </li>
                <li>
                  <a
                    className="font-medium text-copper underline-offset-2 hover:underline"
                    href={`/api/v1/samples/${s.id}/export?format=methods&lab=${lab}`}
                    download
                  >
                    Methods paragraph (text)
                  </a>{" "}
                  <span className="text-xs text-muted">written from the settings actually used</span>
                </li>
                <li className="text-xs text-muted">The figure: PNG or SVG buttons above the phase plot.</li>
              </ul>
            </Card>
            <Card title="Sessions">
              {sessions.length === 0 ? (
                <EmptyState title="No sessions for this sample">
                  Create a session for each cooldown or tip, then upload its spectra.
                </EmptyState>
              ) : (
                <ul className="divide-y divide-line">
                  {sessions.map((x) => (
                    <li key={x.id} className="flex items-baseline justify-between gap-3 py-2.5">
                      <Link className="font-medium hover:underline" href={`/labs/${lab}/sessions/${x.id}`}>
                        {x.label}
                      </Link>
                      <span className="num text-right text-xs text-muted">
                        {x.date} · {x.tipLabel ?? "no tip"} · {x.spectraCount} spectra
                      </span>
                    </li>
                  ))}
                </ul>
              )}
              {s.notes ? (
                <p className="mt-4 whitespace-pre-wrap border-t border-line pt-3 text-sm text-ink-soft">{s.notes}</p>
              ) : null}
            </Card>
          </div>
        </Suspense>
        {map.grids.length ? (
          <Suspense>
            <div className="scroll-mt-4 xl:col-start-1" id="gap-map">
              <Card title="Gap map">
                <GapMap lab={lab} sampleId={s.id} initial={map} />
              </Card>
            </div>
          </Suspense>
        ) : null}
        <Suspense>
          <div className="xl:col-start-1">
            <Card title="Analysis settings">
              <SettingsEditors
                lab={lab}
                sampleId={s.id}
                canEdit={can(ctx.actor.role, "analysis:write")}
                initial={initialVersions}
              />
            </Card>
          </div>
        </Suspense>
      </div>
    </>
  );
}
