import type { Metadata } from "next";
import { ApproachPlot } from "@/components/barrier/approach-plot";
import type { CurveData } from "@/components/barrier/approach-figure";
import { ButtonLink } from "@/components/ui/button";
import { Card, PageHeader } from "@/components/ui/card";
import { orNotFound, pageCtx } from "@/lib/actions/validated";
import { getSessionBarrier } from "@/lib/services/curves/getSessionBarrier";
import { getSession } from "@/lib/services/sessions/getSession";
import { SessionLine } from "../session-line";
import { BARRIER_FLAG_LABELS, type BarrierFlagCode } from "@/lib/spectra/barrier/flags";

export const metadata: Metadata = { title: "I(z) curves" };

const pm = (v: number | null, d = 2) => (v == null ? "—" : v.toFixed(d));

/**
 * A session's I(z) approach curves: each with |I| against z, its fitted exponential, the points
 * left out (shaded, by reason) and the residuals; κ and φ_ap with their uncertainties; and the
 * session's weighted κ, which a field model may take (sample page, Field model).
 */
export default async function SessionBarrierPage({ params }: { params: Promise<{ lab: string; sessionId: string }> }) {
  const { lab, sessionId } = await params;
  const ctx = await pageCtx(lab);
  const { session: s, sampleName, tipLabel } = await orNotFound(getSession({ ctx, input: { id: sessionId } }));
  const b = await getSessionBarrier({ ctx, input: { sessionId: s.id, withData: true } });
  const sum = b.summary;
  return (
    <>
      <PageHeader
        eyebrow="Session · I(z) curves"
        title={s.label}
        description={
          <SessionLine lab={lab} sampleId={s.sampleId} sampleName={sampleName} date={s.date} tipLabel={tipLabel} />
        }
        actions={
          <ButtonLink variant="secondary" href={`/labs/${lab}/sessions/${s.id}`}>
            Session
          </ButtonLink>
        }
      />
      <div className="space-y-6">
        <Card title="Decay constant of this session">
          {sum ? (
            <div className="space-y-2" data-testid="barrier-summary">
              <p className="num text-2xl text-ink">
                κ = {pm(sum.kappa_per_nm)} ± {pm(sum.kappaSigma_per_nm)} nm⁻¹ · φ<sub>ap</sub> = {pm(sum.barrierHeight_eV)} ±{" "}
                {pm(sum.barrierHeightSigma_eV)} eV
              </p>
              <p className="text-xs text-ink-soft">
                Weighted mean of {sum.curves} fitted curve{sum.curves > 1 ? "s" : ""} (weights 1/σ², their spread
                added), with I ∝ exp(−2κz) and φ<sub>ap</sub> = ħ²κ²/(2m<sub>e</sub>). A field model can take κ from
                here instead of the work functions&apos; mean: sample page, Field model, &ldquo;I(z) curves&rdquo;.
              </p>
            </div>
          ) : (
            <p className="text-sm text-ink-soft">
              {b.curves.length ? "None of this session's I(z) curves could be fitted." : "No I(z) curves in this session yet: upload files with a z column and a current column."}
            </p>
          )}
        </Card>
        {b.curves.map((c) => (
          <Card key={c.id} title={`${c.file}${c.label ? ` · ${c.label}` : ""}`}>
            <div className="space-y-3" data-testid="curve-card">
              {c.status === "ok" ? (
                <p className="num text-sm text-ink">
                  κ = {pm(c.kappa_per_nm)} ± {pm(c.kappaSigma_per_nm)} nm⁻¹ · φ<sub>ap</sub> = {pm(c.barrierHeight_eV)} ±{" "}
                  {pm(c.barrierHeightSigma_eV)} eV · {c.pointsUsed} of {c.nPoints} points used
                  {c.sweeps.length > 1
                    ? ` · ${c.sweeps.map((w) => `${w.direction} ${pm(w.kappa_per_nm)} ± ${pm(w.kappaSigma_per_nm)}`).join(", ")}`
                    : ""}
                </p>
              ) : (
                <p className="text-sm text-danger" data-testid="curve-error">
                  No κ: {c.message}
                </p>
              )}
              {c.flags.length ? (
                <ul className="text-xs text-copper">
                  {c.flags.map((f) => (
                    <li key={f.code}>
                      {BARRIER_FLAG_LABELS[f.code as BarrierFlagCode] ?? f.code}: {f.message}
                    </li>
                  ))}
                </ul>
              ) : null}
              <ApproachPlot curve={c as CurveData} filename={`iz-${c.label || c.index}`} />
              {c.warnings.length ? (
                <ul className="list-disc space-y-0.5 pl-4 text-xs text-ink-soft">
                  {c.warnings.map((w) => (
                    <li key={w}>{w}</li>
                  ))}
                </ul>
              ) : null}
            </div>
          </Card>
        ))}
      </div>
    </>
  );
}
