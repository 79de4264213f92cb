"use client";

import { fieldAssumptions, kappaSourceText } from "@/lib/spectra/field";
import type { FieldModel } from "@/lib/spectra/settings";
import { useSampleVersions, type SampleVersions } from "./sample-queries";

/**
 * "How the field is estimated": the formula, the work functions (from the tips and the sample,
 * which no re-analysis changes) and the field model's assumptions and versions, read from the
 * sample's versions query, so a new field model shows here when it is saved and its fit when the
 * re-analysis ends, like every other card of the page.
 */
export function FieldModelCard({
  lab,
  sampleId,
  initial,
  model,
  tipText,
}: {
  lab: string;
  sampleId: string;
  initial: SampleVersions;
  model: FieldModel;
  tipText: string;
}) {
  const versions = useSampleVersions(lab, sampleId, initial);
  const stored = versions.fieldModel.model as Partial<FieldModel>;
  const current: FieldModel = {
    ...model,
    contactDistance_nm: stored.contactDistance_nm ?? model.contactDistance_nm,
    contactDistanceSigma_nm: stored.contactDistanceSigma_nm ?? model.contactDistanceSigma_nm,
    barrierHeight_eV: stored.barrierHeight_eV ?? null,
    barrierHeightSigma_eV: stored.barrierHeightSigma_eV ?? 0,
    assumedBarrierSigma_eV: stored.assumedBarrierSigma_eV ?? 0,
    screening: stored.screening ?? model.screening,
  };
  return (
    <div className="space-y-2 text-xs leading-relaxed text-ink-soft" data-testid="field-assumptions">
      <p className="num text-ink">
        E = (Φ<sub>tip</sub> − Φ<sub>sample</sub>) / (e·d), d = d<sub>c</sub> + ln(G<sub>0</sub>/G<sub>set</sub>)/(2κ) +
        Δz
      </p>
      <ul className="list-disc space-y-0.5 pl-4">
        <li>
          Φ<sub>tip</sub> = <span className="num">{tipText}</span>
        </li>
        <li>
          Φ<sub>sample</sub> ={" "}
          <span className="num">
            {current.sampleWorkFunction_eV.toFixed(2)} ± {current.sampleWorkFunctionSigma_eV.toFixed(2)} eV
          </span>
        </li>
        <li data-testid="kappa-source">{kappaSourceText(versions.fieldModel.model)}</li>
        {fieldAssumptions(current).map((a) => (
          <li key={a}>{a}</li>
        ))}
      </ul>
      <p>
        Field model <span className="num">v{versions.fieldModel.version}</span>, extraction settings{" "}
        <span className="num">v{versions.settings.version}</span>. Error bars: gap from the pick&apos;s uncertainty. The
        field&apos;s uncertainty (work functions, contact distance, κ) is common to all points: one bar at the top of the
        plot, and it widens the critical field&apos;s interval. With κ from I(z) curves, their κ&apos;s uncertainty takes
        the place of the work functions&apos; in the distance.
      </p>
    </div>
  );
}
