import type { MeasurementSession, Sample, Tip } from "@/db/schema";

/** The API's spelling of records: units in the names, ISO dates. */
export const presentSample = (s: Sample) => ({
  id: s.id,
  name: s.name,
  material: s.material,
  substrate: s.substrate,
  workFunction_eV: s.workFunctionEv,
  workFunctionSigma_eV: s.workFunctionSigmaEv,
  notes: s.notes,
  createdAt: s.createdAt.toISOString(),
  updatedAt: s.updatedAt.toISOString(),
});

export const presentTip = (t: Tip) => ({
  id: t.id,
  label: t.label,
  material: t.material,
  workFunction_eV: t.workFunctionEv,
  workFunctionSigma_eV: t.workFunctionSigmaEv,
  preparedOn: t.preparedOn,
  notes: t.notes,
  createdAt: t.createdAt.toISOString(),
});

export const presentSession = (s: MeasurementSession) => ({
  id: s.id,
  sampleId: s.sampleId,
  tipId: s.tipId,
  label: s.label,
  date: s.date,
  instrument: s.instrument,
  temperature_K: s.temperatureK,
  notes: s.notes,
  createdAt: s.createdAt.toISOString(),
});
