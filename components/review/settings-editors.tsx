"use client";

import { useQueryClient } from "@tanstack/react-query";
import { useState, type FormEvent } from "react";
import { Button } from "@/components/ui/button";
import { Notice } from "@/components/ui/card";
import { Field, Input, Select } from "@/components/ui/field";
import { api, ApiError } from "@/lib/api-client";
import { queryKeys } from "@/lib/query-keys";
import { readNumber } from "@/lib/schemas/number";
import { followRun, RUN_ACTIVE, useSampleVersions, type SampleVersions } from "./sample-queries";
import { counted } from "@/lib/format";

type Versions = SampleVersions;

/**
 * A number field's value, read as every input reads numbers (`readNumber`): null when blank, the
 * number (a decimal comma accepted), or else the text as typed, which the server refuses with its
 * own message ("must be a number"); a NaN would travel as null and read as "blank".
 */
function num(v: FormDataEntryValue | null): number | string | null {
  const x = readNumber(v === null ? "" : String(v));
  return x === undefined ? null : (x as number | string);
}

/**
 * Progress of the background re-analysis that a saved version started: the spectra, then the refit
 * of the critical field as the last step, so the bar is full only when the work has ended.
 */
function RunProgress({ run }: { run: Versions["run"] }) {
  if (!run) return null;
  if (run.status === "done") return <p className="text-xs text-muted">Last re-analysis ({run.reason}) finished: {counted(run.done, "spectrum", "spectra")} and the critical field.</p>;
  if (run.status === "failed") return <Notice tone="danger">{run.message ?? `The re-analysis (${run.reason}) stopped.`}</Notice>;
  const pct = Math.round((100 * run.done) / (run.total + 1));
  const step = run.status === "queued" ? "queued" : run.status === "fitting" ? `${run.total} of ${run.total} spectra; refitting the critical field…` : `${run.done} of ${run.total} spectra`;
  return (
    <div aria-live="polite" data-testid="reanalysis-progress" data-status={run.status}>
      <p className="text-xs text-ink-soft">
        Re-analysing ({run.reason}): {step}
      </p>
      <div className="mt-1 h-1.5 overflow-hidden rounded-full bg-line" role="progressbar" aria-valuenow={pct} aria-valuemin={0} aria-valuemax={100} aria-label="Re-analysis progress">
        <div className="h-full bg-teal transition-[width]" style={{ width: `${pct}%` }} />
      </div>
    </div>
  );
}

/** Smoothing methods and where κ comes from, as the form's choices and the read-only view name them. */
const METHOD_LABEL: Record<string, string> = { "savitzky-golay": "Savitzky–Golay", gaussian: "Gaussian", fft: "FFT low-pass", none: "none" };
const DECAY_LABEL: Record<string, string> = { "mean-work-function": "mean work function", measured: "measured barrier" };
/** Older field models carry no source: a barrier height means it was measured. */
const decaySource = (m: Versions["fieldModel"]["model"]): string => m.decayConstantSource ?? (m.barrierHeight_eV ? "measured" : "mean-work-function");

/** A value with its unit, or what a blank means. */
const shown = (v: unknown, unit: string, blank: string) => (v === null || v === undefined || v === "" ? blank : `${v}${unit ? ` ${unit}` : ""}`);

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
function ReadOnlyVersions({ data }: { data: Versions }) {
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
          ["Threshold", `baseline + ${shown(s.threshold?.k, "", "—")}·σ, ${shown(s.threshold?.consecutive, "", "—")} consecutive points, a rise sustained over ${shown(s.threshold?.sustain_mV, "mV", "—")}`],
          ["In-gap baseline", s.baseline?.maxDegree === 0 ? "flat" : `robust polynomial, degree up to ${shown(s.baseline?.maxDegree, "", "—")} where the data show a slope or curve`],
          ["Search", s.search?.minBias_V == null && s.search?.maxBias_V == null ? "whole spectrum" : `${shown(s.search?.minBias_V, "V", "start")} to ${shown(s.search?.maxBias_V, "V", "end")}`],
          ["Edge refinement", s.fit?.enabled ? "broadening-aware fit (thermal and lock-in kernels)" : "threshold only"],
        ]}
      />
      <div className="border-t border-line pt-4">
        <Facts
          title="Field model"
          version={data.fieldModel.version}
          rows={[
            ["Contact distance d_c", `${shown(m.contactDistance_nm, "", "—")} ± ${shown(m.contactDistanceSigma_nm, "nm", "—")}`],
            ["Screening factor", shown(m.screening, "", "1 (none)")],
            ["Decay constant κ from", source === "measured" ? `${DECAY_LABEL.measured}, ${shown(m.barrierHeight_eV, "eV", "—")}` : DECAY_LABEL[source]],
          ]}
        />
      </div>
      <p className="text-xs text-muted">Analysts and owners change these; each change becomes a new version and the sample is re-analysed.</p>
    </div>
  );
}

/**
 * Editors of a sample's extraction settings and field model. Saving makes a new version; the
 * automatic picks nobody corrected by hand and every field estimate are re-run in the background.
 */
export function SettingsEditors({ lab, sampleId, canEdit, initial }: { lab: string; sampleId: string; canEdit: boolean; initial: Versions }) {
  const qc = useQueryClient();
  const data = useSampleVersions(lab, sampleId, initial);
  const [msg, setMsg] = useState<{ tone: "ok" | "danger"; text: string; fields?: Record<string, string[]>; runId?: string } | null>(null);
  // "Being re-analysed" holds only until that run has ended; then the progress line says it finished.
  const shownMsg = msg && !(msg.runId && data.run?.id === msg.runId && !RUN_ACTIVE.has(data.run.status)) ? msg : null;
  const s = data.settings.settings;
  const m = data.fieldModel.model;

  async function save(kind: "settings" | "field", e: FormEvent<HTMLFormElement>) {
    e.preventDefault();
    const f = new FormData(e.currentTarget);
    try {
      let saved: { runId?: string };
      if (kind === "settings") {
        saved = await api(lab, "PUT", `/samples/${sampleId}/extraction-settings`, {
          settings: {
            smoothing: { method: f.get("method"), window_mV: num(f.get("window_mV")), order: num(f.get("order")), gaussianSigma_mV: num(f.get("gaussianSigma_mV")), fftCutoff_mV: num(f.get("fftCutoff_mV")) },
            threshold: { k: num(f.get("k")), consecutive: num(f.get("consecutive")), sustain_mV: num(f.get("sustain_mV")) },
            baseline: { maxDegree: num(f.get("maxDegree")) },
            search: { minBias_V: num(f.get("minBias_V")), maxBias_V: num(f.get("maxBias_V")) },
            fit: { enabled: f.get("fit") === "on" },
          },
          note: String(f.get("note") ?? "") || undefined,
        });
      } else {
        const source = String(f.get("decayConstantSource"));
        saved = await api(lab, "PUT", `/samples/${sampleId}/field-model`, {
          // Blank here is left out: the server's default, or its "must be a number" where none applies.
          contactDistance_nm: num(f.get("contactDistance_nm")) ?? undefined,
          contactDistanceSigma_nm: num(f.get("contactDistanceSigma_nm")) ?? undefined,
          decayConstantSource: source,
          barrierHeight_eV: source === "measured" ? num(f.get("barrierHeight_eV")) : null,
          screening: num(f.get("screening")) ?? undefined,
          note: String(f.get("note") ?? "") || undefined,
        });
      }
      followRun(saved.runId);
      setMsg({ tone: "ok", text: "Saved as a new version; the sample is being re-analysed.", runId: saved.runId });
      await qc.invalidateQueries({ queryKey: queryKeys.sampleVersions(sampleId) });
    } catch (err) {
      const fields = err instanceof ApiError ? err.body?.error?.fields : undefined;
      // With marked fields the banner need not repeat them by their API names.
      const text = fields && Object.keys(fields).length ? "Not saved: correct the marked values." : err instanceof ApiError ? err.message : "Not saved.";
      setMsg({ tone: "danger", text, fields });
    }
  }

  const fe = (k: string) => msg?.fields?.[k];
  if (!canEdit) return <ReadOnlyVersions data={data} />;
  return (
    <div className="space-y-5" data-testid="settings-editors">
      <RunProgress run={data.run} />
      {shownMsg ? <Notice tone={shownMsg.tone}>{shownMsg.text}</Notice> : null}
      <form key={data.settings.id} onSubmit={(e) => save("settings", e)} className="space-y-3" aria-label="Extraction settings">
        <h3 className="text-sm font-semibold">
          Extraction settings <span className="num font-normal text-muted">v{data.settings.version}</span>
        </h3>
        <fieldset className="grid gap-3 sm:grid-cols-3">
          <Field label="Smoothing" name="method">
            <Select name="method" defaultValue={s.smoothing?.method}>
              {Object.entries(METHOD_LABEL).map(([value, label]) => (
                <option key={value} value={value}>
                  {label}
                </option>
              ))}
            </Select>
          </Field>
          <Field label="SG window" name="window_mV" unit="mV" hint="blank: from the resolution" error={fe("smoothing.window_mV")}>
            <Input name="window_mV" defaultValue={s.smoothing?.window_mV ?? ""} className="num" />
          </Field>
          <Field label="SG order" name="order" error={fe("smoothing.order")}>
            <Input name="order" defaultValue={s.smoothing?.order} className="num" />
          </Field>
          <Field label="Gaussian σ" name="gaussianSigma_mV" unit="mV" hint="blank: from the resolution" error={fe("smoothing.gaussianSigma_mV")}>
            <Input name="gaussianSigma_mV" defaultValue={s.smoothing?.gaussianSigma_mV ?? ""} className="num" />
          </Field>
          <Field label="FFT cutoff" name="fftCutoff_mV" unit="mV" hint="shortest period kept" error={fe("smoothing.fftCutoff_mV")}>
            <Input name="fftCutoff_mV" defaultValue={s.smoothing?.fftCutoff_mV ?? ""} className="num" />
          </Field>
          <Field label="Threshold k" name="k" hint="edge at baseline + k·σ" error={fe("threshold.k")}>
            <Input name="k" defaultValue={s.threshold?.k} className="num" />
          </Field>
          <Field label="Consecutive points" name="consecutive" error={fe("threshold.consecutive")}>
            <Input name="consecutive" defaultValue={s.threshold?.consecutive} className="num" />
          </Field>
          <Field label="Sustained rise" name="sustain_mV" unit="mV" hint="a band edge stays above the threshold this long" error={fe("threshold.sustain_mV")}>
            <Input name="sustain_mV" defaultValue={s.threshold?.sustain_mV} className="num" />
          </Field>
          <Field label="Baseline degree" name="maxDegree" hint="highest: 0 flat, 1 sloped, 2 curved" error={fe("baseline.maxDegree")}>
            <Input name="maxDegree" defaultValue={s.baseline?.maxDegree} className="num" />
          </Field>
          <Field label="Search from" name="minBias_V" unit="V" hint="blank: whole spectrum" error={fe("search.minBias_V")}>
            <Input name="minBias_V" defaultValue={s.search?.minBias_V ?? ""} className="num" />
          </Field>
          <Field label="Search to" name="maxBias_V" unit="V" error={fe("search.maxBias_V")}>
            <Input name="maxBias_V" defaultValue={s.search?.maxBias_V ?? ""} className="num" />
          </Field>
          <label className="flex items-center gap-2 text-sm sm:col-span-2">
            <input type="checkbox" name="fit" defaultChecked={s.fit?.enabled} /> refine each edge with the broadening-aware fit (thermal and lock-in kernels)
          </label>
          <Field label="Note" name="note" error={fe("note")}>
            <Input name="note" placeholder="why this change" />
          </Field>
        </fieldset>
        <div className="flex justify-end">
          <Button type="submit">Save settings as v{data.settings.version + 1}</Button>
        </div>
      </form>
      <form key={data.fieldModel.id} onSubmit={(e) => save("field", e)} className="space-y-3 border-t border-line pt-4" aria-label="Field model">
        <h3 className="text-sm font-semibold">
          Field model <span className="num font-normal text-muted">v{data.fieldModel.version}</span>
        </h3>
        <fieldset className="grid gap-3 sm:grid-cols-3">
          <Field label="Contact distance d_c" name="contactDistance_nm" unit="nm" error={fe("contactDistance_nm")}>
            <Input name="contactDistance_nm" defaultValue={m.contactDistance_nm} className="num" />
          </Field>
          <Field label="its uncertainty" name="contactDistanceSigma_nm" unit="nm" error={fe("contactDistanceSigma_nm")}>
            <Input name="contactDistanceSigma_nm" defaultValue={m.contactDistanceSigma_nm} className="num" />
          </Field>
          <Field label="Screening factor" name="screening" hint="1 = none" error={fe("screening")}>
            <Input name="screening" defaultValue={m.screening} className="num" />
          </Field>
          <Field label="Decay constant κ from" name="decayConstantSource">
            <Select name="decayConstantSource" defaultValue={decaySource(m)}>
              {Object.entries(DECAY_LABEL).map(([value, label]) => (
                <option key={value} value={value}>
                  {label}
                </option>
              ))}
            </Select>
          </Field>
          <Field label="Apparent barrier height" name="barrierHeight_eV" unit="eV" hint="from an I(z) curve: 0.952·(d ln I/dz [Å⁻¹])²" error={fe("barrierHeight_eV")}>
            <Input name="barrierHeight_eV" defaultValue={m.barrierHeight_eV ?? ""} className="num" />
          </Field>
          <Field label="Note" name="note" error={fe("note")}>
            <Input name="note" placeholder="why this change" />
          </Field>
        </fieldset>
        <p className="text-xs text-muted">Tip and sample work functions come from each session&apos;s tip and from the sample (edit them there).</p>
        <div className="flex justify-end">
          <Button type="submit">Save field model as v{data.fieldModel.version + 1}</Button>
        </div>
      </form>
    </div>
  );
}
