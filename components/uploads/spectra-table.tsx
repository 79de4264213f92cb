"use client";

import { keepPreviousData, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import Link from "next/link";
import { useState } from "react";
import { FlagBadges } from "@/components/review/quality-flags";
import { Badge } from "@/components/ui/badge";
import { Button } from "@/components/ui/button";
import { Notice } from "@/components/ui/card";
import { api, ApiError } from "@/lib/api-client";
import { formatGap } from "@/lib/format";
import { queryKeys } from "@/lib/query-keys";
import { readNumber } from "@/lib/schemas/number";
import { QUALITY_FLAG_CODES, QUALITY_FLAG_LABELS, type QualityFlag } from "@/lib/spectra/edges/flags";

type Row = {
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
type Page = { total: number; page: number; pageSize: number; rows: Row[]; regions: string[] };
type Sort = "index" | "file" | "region" | "setpointCurrent" | "zOffset" | "gap" | "field";
type Patch = { region?: string | null; setpointBias_V?: number | null; setpointCurrent_A?: number | null; zOffset_pm?: number | null; tipId?: string | null };

/** What a typed value becomes: the API's value (null clears), or why it was not sent. */
type Parsed = { value: string | number | null } | { error: string };

/** A number cell: blank clears; a number in the column's unit (a decimal comma is read as a point), scaled to the API's unit; anything else is refused before it is sent. */
const numberCell =
  (label: string, unit: string, toApi = 1) =>
  (s: string): Parsed => {
    const v = readNumber(s);
    if (v === undefined) return { value: null };
    return typeof v === "number" && Number.isFinite(v) ? { value: v * toApi } : { error: `Not saved: ${label} "${s.trim()}" is not a number (in ${unit}).` };
  };

/** The editable fields, with how the table shows them and how a typed value becomes the API's unit. */
const EDITABLE = {
  region: { label: "Region", unit: "", show: (r: Row) => r.region ?? "", parse: (s: string): Parsed => ({ value: s.trim() ? s.trim() : null }) },
  setpointBias_V: { label: "V set", unit: "V", show: (r: Row) => (r.setpointBias_V == null ? "" : String(r.setpointBias_V)), parse: numberCell("setpoint bias", "V") },
  setpointCurrent_A: { label: "I set", unit: "pA", show: (r: Row) => (r.setpointCurrent_A == null ? "" : String(+(r.setpointCurrent_A * 1e12).toPrecision(6))), parse: numberCell("setpoint current", "pA", 1e-12) },
  zOffset_pm: { label: "Δz", unit: "pm", show: (r: Row) => (r.zOffset_pm == null ? "" : String(r.zOffset_pm)), parse: numberCell("z offset", "pm") },
} as const;
type EditKey = keyof typeof EDITABLE;

function EditableCell({ row, field, canEdit, onSave }: { row: Row; field: EditKey; canEdit: boolean; onSave: (ids: string[], field: EditKey, parsed: Parsed) => Promise<void> }) {
  const spec = EDITABLE[field];
  const [editing, setEditing] = useState(false);
  const [value, setValue] = useState(spec.show(row));
  if (!canEdit) return <span className="num">{spec.show(row) || "—"}</span>;
  if (!editing)
    return (
      <button type="button" className="num w-full rounded px-1 py-0.5 text-left hover:bg-copper-soft/60" onClick={() => { setValue(spec.show(row)); setEditing(true); }} aria-label={`Edit ${spec.label} of ${row.label}`}>
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

export function SpectraTable({ lab, sessionId, sampleId, canEdit, tips }: { lab: string; sessionId: string; sampleId: string; canEdit: boolean; tips: { id: string; label: string }[] }) {
  const qc = useQueryClient();
  const [page, setPage] = useState(1);
  const [sort, setSort] = useState<Sort>("index");
  const [dir, setDir] = useState<"asc" | "desc">("asc");
  const [q, setQ] = useState("");
  const [region, setRegion] = useState("");
  /** "" all, "flagged", "unflagged", or a flag's code: filtered on the server, like the rest. */
  const [flag, setFlag] = useState("");
  const [selected, setSelected] = useState<Set<string>>(new Set());
  const [bulk, setBulk] = useState<{ field: EditKey | "tipId"; value: string }>({ field: "region", value: "" });
  const [error, setError] = useState<string | null>(null);
  const pageSize = 50;
  const params = { page, sort, dir, q, region, flag };
  const { data, isLoading, isError, refetch } = useQuery({
    queryKey: queryKeys.sessionSpectra(sessionId, params),
    queryFn: () => api<Page>(lab, "GET", `/sessions/${sessionId}/spectra?${new URLSearchParams({ page: String(page), pageSize: String(pageSize), sort, dir, ...(q ? { q } : {}), ...(region ? { region } : {}), ...(flag ? { flag } : {}) })}`),
    placeholderData: keepPreviousData,
    refetchInterval: 5000,
  });
  const tag = useMutation({
    mutationFn: (v: { ids: string[]; patch: Patch }) => api(lab, "PATCH", "/spectra/tags", v),
    onSuccess: () => {
      setError(null);
      void qc.invalidateQueries({ queryKey: queryKeys.sessionSpectra(sessionId) });
      void qc.invalidateQueries({ queryKey: queryKeys.phase(sampleId) });
    },
    onError: (e) => setError(e instanceof ApiError ? e.message : "The change was not saved."),
  });
  const send = async (ids: string[], patch: Patch) => {
    await tag.mutateAsync({ ids, patch }).catch(() => undefined);
  };
  /** A typed value: sent when it reads as one, otherwise the reason is shown and nothing changes. */
  const save = async (ids: string[], field: EditKey, parsed: Parsed) => {
    if ("error" in parsed) setError(parsed.error);
    else await send(ids, { [field]: parsed.value });
  };
  const header = (key: Sort, label: string, unit?: string) => (
    <th scope="col" className="px-3 py-2 font-semibold" aria-sort={sort === key ? (dir === "asc" ? "ascending" : "descending") : undefined}>
      <button
        type="button"
        className="inline-flex items-center gap-1 uppercase tracking-wide hover:text-ink"
        onClick={() => {
          if (sort === key) setDir(dir === "asc" ? "desc" : "asc");
          else {
            setSort(key);
            setDir("asc");
          }
          setPage(1);
        }}
      >
        {label}
        {unit ? <span className="normal-case text-muted">({unit})</span> : null}
        <span aria-hidden className="text-[10px]">{sort === key ? (dir === "asc" ? "▲" : "▼") : "↕"}</span>
      </button>
    </th>
  );
  const rows = data?.rows ?? [];
  const allOnPage = rows.length > 0 && rows.every((r) => selected.has(r.id));
  const pages = data ? Math.max(1, Math.ceil(data.total / pageSize)) : 1;

  const applyBulk = async () => {
    const ids = [...selected];
    if (!ids.length) return;
    if (bulk.field === "tipId") await send(ids, { tipId: bulk.value || null });
    else await save(ids, bulk.field, EDITABLE[bulk.field].parse(bulk.value));
  };

  return (
    <div className="space-y-3" data-testid="spectra-table">
      <div className="flex flex-wrap items-center gap-2">
        <input type="search" placeholder="Filter by file, label or region" aria-label="Filter spectra" value={q} onChange={(e) => { setQ(e.target.value); setPage(1); }} className="w-64 rounded-md border border-line bg-white px-3 py-1.5 text-sm" />
        <select aria-label="Region" value={region} onChange={(e) => { setRegion(e.target.value); setPage(1); }} className="rounded-md border border-line bg-white px-2 py-1.5 text-sm">
          <option value="">All regions</option>
          <option value="(none)">No region</option>
          {data?.regions.map((r) => (
            <option key={r} value={r}>
              {r}
            </option>
          ))}
        </select>
        <select aria-label="Quality flags" data-testid="flag-filter" value={flag} onChange={(e) => { setFlag(e.target.value); setPage(1); }} className="rounded-md border border-line bg-white px-2 py-1.5 text-sm">
          <option value="">Flagged or not</option>
          <option value="flagged">Flagged</option>
          <option value="unflagged">Not flagged</option>
          {QUALITY_FLAG_CODES.map((c) => (
            <option key={c} value={c}>
              Flag: {QUALITY_FLAG_LABELS[c]}
            </option>
          ))}
        </select>
        <span className="num ml-auto text-xs text-muted">{data ? `${data.total} spectra` : ""}</span>
      </div>
      {canEdit && selected.size > 0 ? (
        <div className="flex flex-wrap items-center gap-2 rounded-lg border border-copper/40 bg-copper-soft/50 px-3 py-2 text-sm" data-testid="bulk-bar">
          <span className="font-medium">{selected.size} selected:</span>
          <select aria-label="Field to set" value={bulk.field} onChange={(e) => setBulk({ field: e.target.value as EditKey | "tipId", value: "" })} className="rounded border border-line bg-white px-2 py-1">
            <option value="region">Region</option>
            <option value="setpointBias_V">Setpoint bias (V)</option>
            <option value="setpointCurrent_A">Setpoint current (pA)</option>
            <option value="zOffset_pm">z offset (pm)</option>
            <option value="tipId">Tip</option>
          </select>
          {bulk.field === "tipId" ? (
            <select aria-label="Tip" value={bulk.value} onChange={(e) => setBulk({ ...bulk, value: e.target.value })} className="rounded border border-line bg-white px-2 py-1">
              <option value="">none</option>
              {tips.map((t) => (
                <option key={t.id} value={t.id}>
                  {t.label}
                </option>
              ))}
            </select>
          ) : (
            <input aria-label="New value" value={bulk.value} onChange={(e) => setBulk({ ...bulk, value: e.target.value })} className="num w-32 rounded border border-line bg-white px-2 py-1" placeholder="empty clears" />
          )}
          <Button type="button" className="py-1" onClick={applyBulk} disabled={tag.isPending}>
            {tag.isPending ? "Saving…" : "Apply"}
          </Button>
          <Button type="button" variant="ghost" className="py-1" onClick={() => setSelected(new Set())}>
            Clear selection
          </Button>
        </div>
      ) : null}
      {error ? <Notice tone="danger">{error}</Notice> : null}
      <div className="overflow-x-auto rounded-lg border border-line bg-card">
        <table className="w-full min-w-[980px] text-left text-sm">
          <thead className="bg-paper/70 text-xs uppercase tracking-wide text-muted">
            <tr>
              {canEdit ? (
                <th className="w-8 px-3 py-2">
                  <input type="checkbox" aria-label="Select all on this page" checked={allOnPage} onChange={() => setSelected((s) => { const n = new Set(s); rows.forEach((r) => (allOnPage ? n.delete(r.id) : n.add(r.id))); return n; })} />
                </th>
              ) : null}
              {header("index", "Spectrum")}
              {header("region", "Region")}
              <th scope="col" className="px-3 py-2 font-semibold">V set <span className="normal-case">(V)</span></th>
              {header("setpointCurrent", "I set", "pA")}
              {header("zOffset", "Δz", "pm")}
              {header("field", "Field", "V/nm")}
              {header("gap", "Gap")}
              <th scope="col" className="px-3 py-2 font-semibold">Pick</th>
              <th scope="col" className="px-3 py-2 font-semibold">Flags</th>
            </tr>
          </thead>
          <tbody>
            {isLoading ? (
              Array.from({ length: 5 }, (_, i) => (
                <tr key={i} className="border-b border-line/70">
                  <td colSpan={10} className="px-3 py-3">
                    <div className="h-3 w-2/3 animate-pulse rounded bg-line" />
                  </td>
                </tr>
              ))
            ) : isError ? (
              <tr>
                <td colSpan={10} className="px-3 py-6 text-center text-sm text-danger">
                  The spectra could not be loaded.{" "}
                  <button type="button" className="underline" onClick={() => refetch()}>
                    Retry
                  </button>
                </td>
              </tr>
            ) : rows.length === 0 ? (
              <tr>
                <td colSpan={10} className="px-3 py-6 text-center text-sm text-muted">
                  {q || region || flag ? "No spectra match the filter." : "No spectra yet: drop files above."}
                </td>
              </tr>
            ) : (
              rows.map((r) => (
                <tr key={r.id} className="border-b border-line/70 last:border-0 hover:bg-paper/60" data-testid="spectrum-row">
                  {canEdit ? (
                    <td className="px-3 py-1.5">
                      <input type="checkbox" aria-label={`Select ${r.label}`} checked={selected.has(r.id)} onChange={() => setSelected((s) => { const n = new Set(s); if (n.has(r.id)) n.delete(r.id); else n.add(r.id); return n; })} />
                    </td>
                  ) : null}
                  <td className="px-3 py-1.5">
                    <Link href={`/labs/${lab}/spectra/${r.id}`} className="font-medium hover:underline">
                      {r.sourceName}
                    </Link>
                    <span className="num text-xs text-muted"> #{r.index}{r.label && !r.label.startsWith("spectrum") ? ` · ${r.label}` : ""}</span>
                  </td>
                  <td className="px-3 py-1.5"><EditableCell row={r} field="region" canEdit={canEdit} onSave={save} /></td>
                  <td className="px-3 py-1.5"><EditableCell row={r} field="setpointBias_V" canEdit={canEdit} onSave={save} /></td>
                  <td className="px-3 py-1.5"><EditableCell row={r} field="setpointCurrent_A" canEdit={canEdit} onSave={save} /></td>
                  <td className="px-3 py-1.5"><EditableCell row={r} field="zOffset_pm" canEdit={canEdit} onSave={save} /></td>
                  <td className="num px-3 py-1.5">{r.field_V_per_nm == null ? <span className="text-muted" title="No setpoint: no distance or field">—</span> : `${r.field_V_per_nm.toFixed(3)} ± ${(r.fieldSigma_V_per_nm ?? 0).toFixed(3)}`}</td>
                  <td className="num px-3 py-1.5">{r.pickStatus === "no-gap" ? "no gap" : formatGap(r.gap_eV, r.closed)}</td>
                  <td className="px-3 py-1.5">
                    {r.excluded ? <Badge tone="danger">excluded</Badge> : r.source === "corrected" ? <Badge tone="copper">✎ corrected</Badge> : <Badge>auto</Badge>}
                  </td>
                  <td className="px-3 py-1.5" data-testid="spectrum-flags">
                    {r.flags?.length ? <FlagBadges flags={r.flags} /> : <span className="text-muted">—</span>}
                  </td>
                </tr>
              ))
            )}
          </tbody>
        </table>
      </div>
      <div className="flex items-center justify-end gap-2 text-sm">
        <Button type="button" variant="secondary" className="py-1" disabled={page <= 1} onClick={() => setPage(page - 1)}>
          Previous
        </Button>
        <span className="num text-xs text-muted">
          page {page} of {pages}
        </span>
        <Button type="button" variant="secondary" className="py-1" disabled={page >= pages} onClick={() => setPage(page + 1)}>
          Next
        </Button>
      </div>
    </div>
  );
}
