"use client";

import { useState } from "react";
import { readNumber } from "@/lib/schemas/number";
import type { QualityFlag } from "@/lib/spectra/edges/flags";

export type Row = {
  id: string;
  sourceName: string;
  index: number;
  label: string;
  region: string | null;
  setpointBias_V: number | null;
  setpointCurrent_A: number | null;
  zOffset_pm: number | null;
  tipId: string | null;
  field_V_per_nm: number | null;
  fieldSigma_V_per_nm: number | null;
  gap_eV: number | null;
  closed: boolean | null;
  pickStatus: string | null;
  source: "auto" | "corrected" | null;
  excluded: boolean | null;
  flags: QualityFlag[] | null;
};
export type SpectraPage = { total: number; page: number; pageSize: number; rows: Row[]; regions: string[] };
export type Sort = "index" | "file" | "region" | "setpointCurrent" | "zOffset" | "gap" | "field";
export type Patch = {
  region?: string | null;
  setpointBias_V?: number | null;
  setpointCurrent_A?: number | null;
  zOffset_pm?: number | null;
  tipId?: string | null;
};

/** What a typed value becomes: the API's value (null clears), or why it was not sent. */
export type Parsed = { value: string | number | null } | { error: string };

/**
 * A number cell: blank clears; a number in the column's unit (a decimal comma is read as a point),
 * scaled to the API's unit; anything else is refused before it is sent.
 */
const numberCell =
  (label: string, unit: string, toApi = 1) =>
  (s: string): Parsed => {
    const v = readNumber(s);
    if (v === undefined) return { value: null };
    return typeof v === "number" && Number.isFinite(v)
      ? { value: v * toApi }
      : { error: `Not saved: ${label} "${s.trim()}" is not a number (in ${unit}).` };
  };

/** The editable fields, with how the table shows them and how a typed value becomes the API's unit. */
export const EDITABLE = {
  region: {
    label: "Region",
    unit: "",
    show: (r: Row) => r.region ?? "",
    parse: (s: string): Parsed => ({ value: s.trim() ? s.trim() : null }),
  },
  setpointBias_V: {
    label: "V set",
    unit: "V",
    show: (r: Row) => (r.setpointBias_V == null ? "" : String(r.setpointBias_V)),
    parse: numberCell("setpoint bias", "V"),
  },
  setpointCurrent_A: {
    label: "I set",
    unit: "pA",
    show: (r: Row) => (r.setpointCurrent_A == null ? "" : String(+(r.setpointCurrent_A * 1e12).toPrecision(6))),
    parse: numberCell("setpoint current", "pA", 1e-12),
  },
  zOffset_pm: {
    label: "Δz",
    unit: "pm",
    show: (r: Row) => (r.zOffset_pm == null ? "" : String(r.zOffset_pm)),
    parse: numberCell("z offset", "pm"),
  },
} as const;
export type EditKey = keyof typeof EDITABLE;

export function EditableCell({
  row,
  field,
  canEdit,
  onSave,
}: {
  row: Row;
  field: EditKey;
  canEdit: boolean;
  onSave: (ids: string[], field: EditKey, parsed: Parsed) => Promise<void>;
}) {
  const spec = EDITABLE[field];
  const [editing, setEditing] = useState(false);
  const [value, setValue] = useState(spec.show(row));
  if (!canEdit) return <span className="num">{spec.show(row) || "—"}</span>;
  if (!editing)
    return (
      <button
        type="button"
        className="num w-full rounded px-1 py-0.5 text-left hover:bg-copper-soft/60"
        onClick={() => {
          setValue(spec.show(row));
          setEditing(true);
        }}
        aria-label={`Edit ${spec.label} of ${row.label}`}
      >
        {spec.show(row) || <span className="text-muted">—</span>}
      </button>
    );
  const save = async () => {
    setEditing(false);
    if (value === spec.show(row)) return;
    await onSave([row.id], field, spec.parse(value));
  };
  return (
    <input
      autoFocus
      className="num w-24 rounded border border-copper bg-white px-1 py-0.5"
      value={value}
      aria-label={`${spec.label}${spec.unit ? ` (${spec.unit})` : ""}`}
      onChange={(e) => setValue(e.target.value)}
      onBlur={save}
      onKeyDown={(e) => {
        if (e.key === "Enter") void save();
        if (e.key === "Escape") setEditing(false);
      }}
    />
  );
}
