"use client";

import type { FormEvent } from "react";
import { Button } from "@/components/ui/button";
import { Field, Input, Select } from "@/components/ui/field";
import { ASSUMED_BARRIER_SIGMA_EV, DEFAULT_EXTRACTION_SETTINGS } from "@/lib/spectra/settings";
import type { SampleVersions } from "./sample-queries";
import { SETTINGS_NUMBERS } from "./settings-bodies";
import { DECAY_LABEL, decaySource, METHOD_LABEL, NORMALISATION_LABEL } from "./settings-facts";

/** A form's title with the version it shows. */
function VersionHeading({ title, version }: { title: string; version: number }) {
  return (
    <h3 className="text-sm font-semibold">
      {title} <span className="num font-normal text-muted">v{version}</span>
    </h3>
  );
}

/** A choice among named values (value → words). */
function Choices({
  name,
  defaultValue,
  labels,
}: {
  name: string;
  defaultValue: string;
  labels: Record<string, string>;
}) {
  return (
    <Select name={name} defaultValue={defaultValue}>
      {Object.entries(labels).map(([value, label]) => (
        <option key={value} value={value}>
          {label}
        </option>
      ))}
    </Select>
  );
}

/** A number with its label, unit and hint, and the server's words when it refused it. */
function NumberField(props: {
  label: string;
  name: string;
  unit?: string;
  hint?: string;
  error?: string[];
  value: unknown;
}) {
  const { name, value, ...field } = props;
  return (
    <Field {...field} name={name}>
      <Input name={name} defaultValue={value as string | number | undefined} className="num" />
    </Field>
  );
}

/** Why this version: kept with it. */
function NoteField({ fe }: { fe: FormProps["fe"] }) {
  return (
    <Field label="Note" name="note" error={fe("note")}>
      <Input name="note" placeholder="why this change" />
    </Field>
  );
}

/** Defaults for a setting an older version does not have (it reads with its default). */
const DEFAULTS = DEFAULT_EXTRACTION_SETTINGS as unknown as Record<string, Record<string, unknown> | undefined>;

type FormProps = {
  data: SampleVersions;
  fe: (field: string) => string[] | undefined;
  onSubmit: (e: FormEvent<HTMLFormElement>) => void;
};

/** The extraction settings as a form; saving makes the next version. */
export function ExtractionSettingsForm({ data, fe, onSubmit }: FormProps) {
  const s = data.settings.settings;
  return (
    <form key={data.settings.id} onSubmit={onSubmit} className="space-y-3" aria-label="Extraction settings">
      <VersionHeading title="Extraction settings" version={data.settings.version} />
      <fieldset className="grid gap-3 sm:grid-cols-3">
        <Field label="Smoothing" name="method">
          <Choices name="method" defaultValue={s.smoothing?.method} labels={METHOD_LABEL} />
        </Field>
        <Field label="Pick on" name="normalisation" error={fe("normalisation.method")}>
          <Choices name="normalisation" defaultValue={s.normalisation?.method ?? "none"} labels={NORMALISATION_LABEL} />
        </Field>
        {SETTINGS_NUMBERS.map(({ at: [group, key], blank, ...field }) => (
          <NumberField
            key={field.name}
            {...field}
            error={fe(`${group}.${key}`)}
            value={blank ? (s[group]?.[key] ?? "") : (s[group]?.[key] ?? DEFAULTS[group]?.[key])}
          />
        ))}
        <label className="flex items-center gap-2 text-sm sm:col-span-2">
          <input type="checkbox" name="fit" defaultChecked={s.fit?.enabled} /> refine each edge with the
          broadening-aware fit (thermal and lock-in kernels)
        </label>
        <label className="flex items-center gap-2 text-sm sm:col-span-2">
          <input type="checkbox" name="tiltedLook" defaultChecked={s.baseline?.tiltedLook ?? true} /> look for a
          tilted or curved in-gap floor before a flat one
        </label>
        <NoteField fe={fe} />
      </fieldset>
      <div className="flex justify-end">
        <Button type="submit">Save settings as v{data.settings.version + 1}</Button>
      </div>
    </form>
  );
}

/** Which I(z) curves κ comes from (with "I(z) curves" chosen): a session's, a tip's, or those ticked below. */
function CurveChoiceField({ data, fe }: Pick<FormProps, "data" | "fe">) {
  const choices = data.curveChoices ?? [];
  const current = data.fieldModel.model.curves as { scope?: string; sessionId?: string; tipId?: string } | null | undefined;
  const value =
    current?.scope === "set"
      ? "set:"
      : current?.scope === "tip"
        ? `tip:${current.tipId}`
        : current?.sessionId
          ? `session:${current.sessionId}`
          : undefined;
  const hint = choices.length ? "used with κ from I(z) curves" : "no fitted I(z) curves on this sample yet";
  return (
    <Field label="I(z) curves" name="curveChoice" hint={hint} error={fe("curveScope") ?? fe("curveSessionId") ?? fe("curveTipId")}>
      <Select name="curveChoice" defaultValue={value ?? (choices[0] ? `${choices[0].scope}:${choices[0].id}` : "")}>
        {choices.map((c) => (
          <option key={`${c.scope}:${c.id}`} value={`${c.scope}:${c.id}`}>
            {`${c.label}: ${c.curves} curve${c.curves > 1 ? "s" : ""}, κ = ${c.kappa_per_nm.toFixed(2)} ± ${c.kappaSigma_per_nm.toFixed(2)} nm⁻¹`}
          </option>
        ))}
        {choices.length > 0 && <option value="set:">the curves ticked below</option>}
      </Select>
    </Field>
  );
}

/** The fitted curves one by one, ticked for a set chosen by hand (its current set ticked). */
function CurveSetField({ data, fe }: Pick<FormProps, "data" | "fe">) {
  const curves = data.fittedCurves ?? [];
  if (curves.length === 0) return null;
  const current = data.fieldModel.model.curves as { scope?: string; curveIds?: string[] } | null | undefined;
  const ticked = new Set(current?.scope === "set" ? (current.curveIds ?? []) : []);
  return (
    <fieldset className="sm:col-span-3" aria-describedby="curve-set-hint">
      <legend className="text-sm font-medium">Curves for a set chosen by hand</legend>
      <p id="curve-set-hint" className="text-xs text-muted">
        Used with &ldquo;the curves ticked below&rdquo;; their κ are averaged with weights 1/σ², their spread added.
      </p>
      {fe("curveIds") && <p className="text-xs text-danger">{fe("curveIds")}</p>}
      <ul className="mt-1 grid gap-x-4 gap-y-0.5 text-sm sm:grid-cols-2">
        {curves.map((c) => (
          <li key={c.id}>
            <label className="flex items-baseline gap-2">
              <input type="checkbox" name="curveIds" value={c.id} defaultChecked={ticked.has(c.id)} />
              <span>
                {c.label}:{" "}
                <span className="num">
                  κ = {c.kappa_per_nm.toFixed(2)} ± {c.kappaSigma_per_nm.toFixed(2)} nm⁻¹
                </span>
                {c.flags.length > 0 && <span className="text-copper"> · flagged: {c.flags.join(", ")}</span>}
              </span>
            </label>
          </li>
        ))}
      </ul>
    </fieldset>
  );
}

/** The field model as a form; saving makes the next version. */
export function FieldModelForm({ data, fe, onSubmit }: FormProps) {
  const m = data.fieldModel.model;
  return (
    <form
      key={data.fieldModel.id}
      onSubmit={onSubmit}
      className="space-y-3 border-t border-line pt-4"
      aria-label="Field model"
    >
      <VersionHeading title="Field model" version={data.fieldModel.version} />
      <fieldset className="grid gap-3 sm:grid-cols-3">
        <NumberField
          label="Contact distance d_c"
          unit="nm"
          error={fe("contactDistance_nm")}
          name="contactDistance_nm"
          value={m.contactDistance_nm}
        />
        <NumberField
          label="its uncertainty"
          unit="nm"
          error={fe("contactDistanceSigma_nm")}
          name="contactDistanceSigma_nm"
          value={m.contactDistanceSigma_nm}
        />
        <NumberField
          label="Screening factor"
          hint="1 = none"
          error={fe("screening")}
          name="screening"
          value={m.screening}
        />
        <Field label="Decay constant κ from" name="decayConstantSource">
          <Choices name="decayConstantSource" defaultValue={decaySource(m)} labels={DECAY_LABEL} />
        </Field>
        <CurveChoiceField data={data} fe={fe} />
        <NumberField
          label="Apparent barrier height"
          unit="eV"
          hint="typed in: 0.952·(d ln I/dz [Å⁻¹])²"
          error={fe("barrierHeight_eV")}
          name="barrierHeight_eV"
          value={decaySource(m) === "measured" ? (m.barrierHeight_eV ?? "") : ""}
        />
        <NumberField
          label="Work-function mean: its uncertainty"
          unit="eV"
          hint="how far the apparent barrier may lie from the mean (assumed)"
          error={fe("assumedBarrierSigma_eV")}
          name="assumedBarrierSigma_eV"
          value={m.assumedBarrierSigma_eV ?? ASSUMED_BARRIER_SIGMA_EV}
        />
        <CurveSetField data={data} fe={fe} />
        <NoteField fe={fe} />
      </fieldset>
      <p className="text-xs text-muted">
        Tip and sample work functions come from each session&apos;s tip and from the sample (edit them there).
      </p>
      <div className="flex justify-end">
        <Button type="submit">Save field model as v{data.fieldModel.version + 1}</Button>
      </div>
    </form>
  );
}
