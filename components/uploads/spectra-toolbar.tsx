"use client";

import { Button } from "@/components/ui/button";
import { QUALITY_FLAG_CODES, QUALITY_FLAG_LABELS } from "@/lib/spectra/edges/flags";
import type { EditKey } from "./spectra-cells";

export type Filters = { q: string; region: string; flag: string };

const SELECT = "rounded-md border border-line bg-white px-2 py-1.5 text-sm";

/** Text search, region and quality-flag filters (all applied on the server), and the count. */
export function SpectraFilters(props: {
  filters: Filters;
  onChange: (f: Filters) => void;
  regions: string[];
  total: number | null;
}) {
  const { filters: f, onChange, regions, total } = props;
  return (
    <div className="flex flex-wrap items-center gap-2">
      <input
        type="search"
        placeholder="Filter by file, label or region"
        aria-label="Filter spectra"
        value={f.q}
        onChange={(e) => onChange({ ...f, q: e.target.value })}
        className="w-64 rounded-md border border-line bg-white px-3 py-1.5 text-sm"
      />
      <select
        aria-label="Region"
        value={f.region}
        onChange={(e) => onChange({ ...f, region: e.target.value })}
        className={SELECT}
      >
        <option value="">All regions</option>
        <option value="(none)">No region</option>
        {regions.map((r) => (
          <option key={r} value={r}>
            {r}
          </option>
        ))}
      </select>
      <select
        aria-label="Quality flags"
        data-testid="flag-filter"
        value={f.flag}
        onChange={(e) => onChange({ ...f, flag: e.target.value })}
        className={SELECT}
      >
        <option value="">Flagged or not</option>
        <option value="flagged">Flagged</option>
        <option value="unflagged">Not flagged</option>
        {QUALITY_FLAG_CODES.map((c) => (
          <option key={c} value={c}>
            Flag: {QUALITY_FLAG_LABELS[c]}
          </option>
        ))}
      </select>
      <span className="num ml-auto text-xs text-muted">{total != null ? `${total} spectra` : ""}</span>
    </div>
  );
}

const BAR = "flex flex-wrap items-center gap-2 rounded-lg border border-copper/40 bg-copper-soft/50 px-3 py-2 text-sm";

export type Bulk = { field: EditKey | "tipId"; value: string };

/** One value for every selected spectrum: a tag, a setpoint, or the tip. */
export function BulkBar(props: {
  count: number;
  bulk: Bulk;
  onChange: (b: Bulk) => void;
  tips: { id: string; label: string }[];
  saving: boolean;
  onApply: () => void;
  onClear: () => void;
  /** Average the selected spectra (repeats at one point) into one. */
  onAverage: () => void;
  averaging: boolean;
}) {
  const { count, bulk, onChange, tips, saving, onApply, onClear, onAverage, averaging } = props;
  const box = "rounded border border-line bg-white px-2 py-1";
  return (
    <div className={BAR} data-testid="bulk-bar">
      <span className="font-medium">{count} selected:</span>
      <select
        aria-label="Field to set"
        value={bulk.field}
        onChange={(e) => onChange({ field: e.target.value as Bulk["field"], value: "" })}
        className={box}
      >
        <option value="region">Region</option>
        <option value="setpointBias_V">Setpoint bias (V)</option>
        <option value="setpointCurrent_A">Setpoint current (pA)</option>
        <option value="zOffset_pm">z offset (pm)</option>
        <option value="tipId">Tip</option>
      </select>
      {bulk.field === "tipId" ? (
        <select
          aria-label="Tip"
          value={bulk.value}
          onChange={(e) => onChange({ ...bulk, value: e.target.value })}
          className={box}
        >
          <option value="">none</option>
          {tips.map((t) => (
            <option key={t.id} value={t.id}>
              {t.label}
            </option>
          ))}
        </select>
      ) : (
        <input
          aria-label="New value"
          value={bulk.value}
          onChange={(e) => onChange({ ...bulk, value: e.target.value })}
          className="num w-32 rounded border border-line bg-white px-2 py-1"
          placeholder="empty clears"
        />
      )}
      <Button type="button" className="py-1" onClick={onApply} disabled={saving}>
        {saving ? "Saving…" : "Apply"}
      </Button>
      <Button
        type="button"
        variant="secondary"
        className="py-1"
        onClick={onAverage}
        disabled={averaging || count < 2}
        title="Average repeats at one point: same sample, setpoint, position and bias range"
        data-testid="average-selected"
      >
        {averaging ? "Averaging…" : "Average"}
      </Button>
      <Button type="button" variant="ghost" className="py-1" onClick={onClear}>
        Clear selection
      </Button>
    </div>
  );
}
