import { kappaSourceText } from "@/lib/spectra/field";
import { RunProgress } from "./run-progress";
import type { SampleVersions } from "./sample-queries";

/** Smoothing methods and where κ comes from, as the form's choices and the read-only view name them. */
export const METHOD_LABEL: Record<string, string> = {
  "savitzky-golay": "Savitzky–Golay",
  gaussian: "Gaussian",
  fft: "FFT low-pass",
  none: "none",
};
/** The view a gap is picked on (`normalisation.method`; older versions have none: raw). */
export const NORMALISATION_LABEL: Record<string, string> = {
  none: "none (raw dI/dV)",
  feenstra: "(dI/dV)/(I/V), Feenstra",
  setpoint: "dI/dV ÷ I_set/V_set",
};
/** The normalisation as words: the method, with its broadening for Feenstra's. */
export function normalisationFact(n: { method?: string; broadening_mV?: number } | undefined): string {
  const method = n?.method ?? "none";
  const label = NORMALISATION_LABEL[method] ?? method;
  return method === "feenstra" ? `${label}, I/V broadened over ${shown(n?.broadening_mV, "mV", "100 mV")}` : label;
}
export const DECAY_LABEL: Record<string, string> = {
  "mean-work-function": "mean work function",
  measured: "measured barrier",
  curves: "I(z) curves",
};
/** Older field models carry no source: a barrier height means it was measured. */
export const decaySource = (m: SampleVersions["fieldModel"]["model"]): string =>
  m.decayConstantSource ?? (m.barrierHeight_eV ? "measured" : "mean-work-function");

/** A value with its unit, or what a blank means. */
const shown = (v: unknown, unit: string, blank: string) =>
  v === null || v === undefined || v === "" ? blank : `${v}${unit ? ` ${unit}` : ""}`;

function Facts({ title, version, rows }: { title: string; version: number; rows: [string, string][] }) {
  return (
    <section aria-label={title}>
      <h3 className="text-sm font-semibold">
        {title} <span className="num font-normal text-muted">v{version}</span>
      </h3>
      <dl className="mt-2 grid grid-cols-[auto_1fr] gap-x-4 gap-y-1 text-sm">
        {rows.map(([k, v]) => (
          <div key={k} className="contents">
            <dt className="text-ink-soft">{k}</dt>
            <dd className="num">{v}</dd>
          </div>
        ))}
      </dl>
    </section>
  );
}

/** The parameters of each smoothing method, as facts (the other methods' fields do not apply). */
const SMOOTHING_FACTS: Record<string, (sm: Record<string, unknown>) => [string, string][]> = {
  "savitzky-golay": (sm) => [
    ["SG window", shown(sm.window_mV, "mV", "from the resolution")],
    ["SG order", shown(sm.order, "", "—")],
  ],
  gaussian: (sm) => [["Gaussian σ", shown(sm.gaussianSigma_mV, "mV", "from the resolution")]],
  fft: (sm) => [["FFT cutoff", shown(sm.fftCutoff_mV, "mV", "from the resolution")]],
};

/** The versions as facts, for people who may not change them: no form, nothing that looks editable. */
export function ReadOnlyVersions({ data }: { data: SampleVersions }) {
  const s = data.settings.settings;
  const m = data.fieldModel.model;
  const method = s.smoothing?.method;
  const smoothing = SMOOTHING_FACTS[method]?.(s.smoothing) ?? [];
  const source = decaySource(m);
  return (
    <div className="space-y-5" data-testid="settings-read-only">
      <RunProgress run={data.run} />
      <Facts
        title="Extraction settings"
        version={data.settings.version}
        rows={[
          ["Smoothing", METHOD_LABEL[method] ?? String(method)],
          ...smoothing,
          [
            "Threshold",
            `baseline + ${shown(s.threshold?.k, "", "—")}·σ, ${shown(s.threshold?.consecutive, "", "—")} consecutive ` +
              `points, a rise sustained over ${shown(s.threshold?.sustain_mV, "mV", "—")}`,
          ],
          [
            "In-gap baseline",
            s.baseline?.maxDegree === 0
              ? "flat"
              : `robust polynomial, degree up to ${shown(s.baseline?.maxDegree, "", "—")} where the data show ` +
                "a slope or curve",
          ],
          [
            "First look",
            s.baseline?.tiltedLook === false ? "flat floor" : "a tilted or curved floor where the gap is one quiet run under it, else flat",
          ],
          [
            "Search",
            s.search?.minBias_V == null && s.search?.maxBias_V == null
              ? "whole spectrum"
              : `${shown(s.search?.minBias_V, "V", "start")} to ${shown(s.search?.maxBias_V, "V", "end")}`,
          ],
          ["Edge refinement", s.fit?.enabled ? "broadening-aware fit (thermal and lock-in kernels)" : "threshold only"],
          ["Picked on", normalisationFact(s.normalisation)],
        ]}
      />
      <div className="border-t border-line pt-4">
        <Facts
          title="Field model"
          version={data.fieldModel.version}
          rows={[
            [
              "Contact distance d_c",
              `${shown(m.contactDistance_nm, "", "—")} ± ${shown(m.contactDistanceSigma_nm, "nm", "—")}`,
            ],
            ["Screening factor", shown(m.screening, "", "1 (none)")],
            [
              "Decay constant κ from",
              source === "curves"
                ? kappaSourceText(m)
                : source === "measured"
                  ? `${DECAY_LABEL.measured}, ${shown(m.barrierHeight_eV, "eV", "—")}`
                  : `${DECAY_LABEL[source]} ± ${shown(m.assumedBarrierSigma_eV ?? 0, "eV", "—")} (assumed)`,
            ],
          ]}
        />
      </div>
      <p className="text-xs text-muted">
        Analysts and owners change these; each change becomes a new version and the sample is re-analysed.
      </p>
    </div>
  );
}
