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
