import { NEW_LAB_DEFAULTS } from "@/lib/schemas/lab";
import type { FieldSpec } from "./entity-form";

/** Field layouts of the lab's forms; the values' rules live in lib/schemas/lab.ts. */
export function sampleFields(v: Partial<Record<string, string>> = {}): FieldSpec[] {
  return [
    { name: "name", label: "Name", placeholder: "e.g. GX-14 bilayer", defaultValue: v.name },
    { name: "material", label: "Material", placeholder: "e.g. germanene (bilayer)", defaultValue: v.material },
    { name: "substrate", label: "Substrate", placeholder: "optional", defaultValue: v.substrate },
    {
      name: "workFunction_eV",
      label: "Sample work function",
      unit: "eV",
      type: "number",
      hint: "Measured, or a published value for the film.",
      defaultValue: v.workFunction_eV,
    },
    {
      name: "workFunctionSigma_eV",
      label: "Its uncertainty (1σ)",
      unit: "eV",
      type: "number",
      hint: "Carried into every field estimate.",
      defaultValue: v.workFunctionSigma_eV,
    },
    { name: "notes", label: "Notes", type: "textarea", defaultValue: v.notes },
  ];
}

export function tipFields(v: Partial<Record<string, string>> = {}): FieldSpec[] {
  return [
    { name: "label", label: "Label", placeholder: "e.g. W-18", defaultValue: v.label },
    { name: "material", label: "Material", placeholder: "e.g. W (etched)", defaultValue: v.material },
    {
      name: "workFunction_eV",
      label: "Tip work function",
      unit: "eV",
      type: "number",
      hint: "Polycrystalline W is about 4.5 eV (CRC Handbook range 4.32–4.55).",
      defaultValue: v.workFunction_eV,
    },
    {
      name: "workFunctionSigma_eV",
      label: "Its uncertainty (1σ)",
      unit: "eV",
      type: "number",
      defaultValue: v.workFunctionSigma_eV,
    },
    { name: "preparedOn", label: "Prepared on", type: "date", defaultValue: v.preparedOn },
    { name: "notes", label: "Notes", type: "textarea", defaultValue: v.notes },
  ];
}

export function sessionFields(
  options: { samples: { id: string; name: string }[]; tips: { id: string; label: string }[] },
  v: Partial<Record<string, string>> = {},
): FieldSpec[] {
  return [
    { name: "label", label: "Label", placeholder: "e.g. approach series B", defaultValue: v.label },
    { name: "date", label: "Date", type: "date", defaultValue: v.date },
    {
      name: "sampleId",
      label: "Sample",
      type: "select",
      options: [
        { value: "", label: "Choose a sample…" },
        ...options.samples.map((s) => ({ value: s.id, label: s.name })),
      ],
      defaultValue: v.sampleId,
    },
    {
      name: "tipId",
      label: "Tip",
      type: "select",
      options: [{ value: "", label: "No tip recorded" }, ...options.tips.map((t) => ({ value: t.id, label: t.label }))],
      defaultValue: v.tipId,
    },
    { name: "instrument", label: "Instrument", placeholder: "e.g. LT-STM bay 2", defaultValue: v.instrument },
    {
      name: "temperature_K",
      label: "Temperature",
      unit: "K",
      type: "number",
      hint: "Sets the thermal broadening (≈3.5 k_BT).",
      defaultValue: v.temperature_K,
    },
    { name: "notes", label: "Notes", type: "textarea", defaultValue: v.notes },
  ];
}

/** A lab's name and the work functions its new tips and samples start with (settings, new lab, setup). */
export function labFields(v: Partial<Record<string, string>> = {}): FieldSpec[] {
  const wf = (name: string, label: string): FieldSpec => ({
    name,
    label,
    unit: "eV",
    type: "number",
    defaultValue: v[name],
  });
  return [
    { name: "name", label: "Lab name", placeholder: "e.g. Surface Physics Group", defaultValue: v.name, wide: true },
    wf("defaultTipWorkFunction_eV", "Tip work function"),
    wf("defaultTipWorkFunctionSigma_eV", "Its uncertainty (1σ)"),
    wf("defaultSampleWorkFunction_eV", "Sample work function"),
    wf("defaultSampleWorkFunctionSigma_eV", "Its uncertainty (1σ)"),
  ];
}

/** A new lab: its fields and its address. */
export function newLabFields(v: Partial<Record<string, string>> = {}): FieldSpec[] {
  const [name, ...defaults] = labFields(v);
  const slug: FieldSpec = {
    name: "slug",
    label: "Address",
    placeholder: "e.g. surface-physics",
    hint: "The lab's pages live at /labs/<address>: lowercase letters, digits, hyphens. Blank: made from the name.",
    defaultValue: v.slug,
    wide: true,
  };
  return [name, slug, ...defaults];
}

/** `/setup`: the group's first lab, its first owner, and the setup code of the start log. */
export function setupFields(v: Partial<Record<string, string>> = {}): FieldSpec[] {
  return [
    {
      name: "code",
      label: "Setup code",
      placeholder: "XXXX-XXXX-XXXX-XXXX",
      hint: "Printed in the start log of the server (npm start); it works once.",
      wide: true,
    },
    ...newLabFields(v),
    { name: "ownerName", label: "Your name", placeholder: "e.g. Adaeze Okafor" },
    { name: "email", label: "Your e-mail", type: "email", placeholder: "you@your-group.example" },
    { name: "password", label: "Choose a password", hint: "At least 10 characters.", type: "password" },
  ];
}

/** What a new lab's work-function fields start from (NEW_LAB_DEFAULTS), as form text. */
export function newLabDefaultValues(): Record<string, string> {
  return Object.fromEntries(Object.entries(NEW_LAB_DEFAULTS).map(([k, v]) => [k, String(v)]));
}
