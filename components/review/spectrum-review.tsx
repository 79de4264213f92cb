"use client";

import { useQuery, useQueryClient } from "@tanstack/react-query";
import Link from "next/link";
import { useCallback, useEffect, useMemo, useRef, useState } from "react";
import { axis, baseLayout, Plot } from "@/components/plots/plot";
import { Badge } from "@/components/ui/badge";
import { Button } from "@/components/ui/button";
import { Notice } from "@/components/ui/card";
import { FlagList } from "./quality-flags";
import { EdgeBox } from "./edge-box";
import { api, ApiError } from "@/lib/api-client";
import { fileStem, formatGap, pickMethodInWords, formatUtc } from "@/lib/format";
import { queryKeys } from "@/lib/query-keys";
import type { getSpectrum } from "@/lib/services/spectra/getSpectrum";

export type SpectrumData = Awaited<ReturnType<typeof getSpectrum>>;
type History = { id: string; action: string; reason: string | null; at: string; actorName: string | null; before: Record<string, unknown>; after: Record<string, unknown> }[];
type Conflict = { message: string; current: { vbEdgeV: number | null; cbEdgeV: number | null; version: number }; updatedBy: string; updatedAt: string };

const mv = (v: number | null | undefined) => (v == null ? "—" : `${(v * 1000).toFixed(1)} mV`);

type Edge = "valence" | "conduction";
/** Steps of the keys that move the selected edge, mV. */
const FINE_MV = 1;
const COARSE_MV = 10;

/**
 * The review keys as the help names them; the handler in SpectrumReview acts on exactly these
 * (`edit` ones only for people who may change picks). F and G are left for other review keys.
 */
const KEY_HELP: { keys: string; does: string; edit?: boolean }[] = [
  { keys: "← →", does: "previous / next spectrum" },
  { keys: "F", does: "next flagged spectrum" },
  { keys: ", .", does: `move the selected edge by ${FINE_MV} mV`, edit: true },
  { keys: "< >", does: `by ${COARSE_MV} mV`, edit: true },
  { keys: "E", does: "switch between the valence and conduction edge", edit: true },
  { keys: "A", does: "accept the pick as it is and go to the next", edit: true },
  { keys: "X", does: "exclude / include", edit: true },
  { keys: "U", does: "undo", edit: true },
];

/**
 * The review screen of one spectrum: raw and smoothed dI/dV (linear or log), noise floor and
 * threshold, the energy resolution, and the two band edges as lines the analyst drags. Saving a
 * correction needs a reason and keeps the automatic pick and the history; a stale save gets the
 * conflict message and the edit stays on screen. The pick's quality flags sit under its numbers.
 * Keys (KEY_HELP): ← → move between spectra; F the next flagged one; , . and < > move the selected
 * edge by 1 and 10 mV, E selects the other edge; A accepts the pick as it is (recorded in its
 * history) and moves on; X excludes or includes; U undoes.
 */
export function SpectrumReview({ lab, initial, canEdit }: { lab: string; initial: SpectrumData; canEdit: boolean }) {
  const qc = useQueryClient();
  const [id, setId] = useState(initial.id);
  const fetchSpectrum = useCallback((sid: string) => api<SpectrumData>(lab, "GET", `/spectra/${sid}`), [lab]);
  const { data = initial, isFetching } = useQuery({ queryKey: queryKeys.spectrum(id), queryFn: () => fetchSpectrum(id), initialData: id === initial.id ? initial : undefined, staleTime: 30_000 });
  const { data: history = [] } = useQuery({ queryKey: [...queryKeys.spectrum(id), "history"], queryFn: async () => (await api<{ history: History }>(lab, "GET", `/spectra/${id}/pick`)).history });
  const [draft, setDraft] = useState<{ vb: number; cb: number } | null>(null);
  // A reason belongs to one action on one spectrum: emptied when the spectrum changes and after
  // a save; the last one used is only offered as a suggestion to click.
  const [reason, setReason] = useState("");
  const [lastReason, setLastReason] = useState<string | null>(null);
  const reasonUsed = (text: string) => {
    if (text.trim()) setLastReason(text.trim());
    setReason("");
  };
  const [logY, setLogY] = useState(false);
  const [selected, setSelected] = useState<Edge>("valence");
  const [busy, setBusy] = useState(false);
  const [notice, setNotice] = useState<{ tone: "ok" | "danger" | "warn"; text: string } | null>(null);
  const [conflict, setConflict] = useState<Conflict | null>(null);
  const reasonRef = useRef<HTMLInputElement>(null);
  const pick = data.pick;

  // Prefetch the neighbours so moving through a sample is instant.
  useEffect(() => {
    for (const n of [data.neighbours.next, data.neighbours.prev, data.neighbours.nextFlagged]) if (n) void qc.prefetchQuery({ queryKey: queryKeys.spectrum(n), queryFn: () => fetchSpectrum(n), staleTime: 30_000 });
  }, [data.neighbours.next, data.neighbours.prev, data.neighbours.nextFlagged, qc, fetchSpectrum]);

  const go = useCallback(
    (target: string | null) => {
      if (!target) return;
      setId(target);
      setDraft(null);
      setReason("");
      setConflict(null);
      setNotice(null);
      window.history.replaceState(null, "", `/labs/${lab}/spectra/${target}`);
    },
    [lab],
  );

  const refresh = useCallback(async () => {
    await qc.invalidateQueries({ queryKey: queryKeys.spectrum(id) });
    await qc.invalidateQueries({ queryKey: queryKeys.phase(data.sampleId) });
  }, [qc, id, data.sampleId]);

  const vb = draft?.vb ?? pick?.vbEdge_V ?? null;
  const cb = draft?.cb ?? pick?.cbEdge_V ?? null;
  const bias = data.arrays.bias_V;
  const biasRange: [number, number] = [bias[0], bias[bias.length - 1]];

  async function saveCorrection(version = pick?.version) {
    if (!pick || vb == null || cb == null || version == null) return;
    if (reason.trim().length < 3) {
      setNotice({ tone: "warn", text: "Give a reason for the correction (it is kept in the history)." });
      reasonRef.current?.focus();
      return;
    }
    setBusy(true);
    try {
      await api(lab, "PATCH", `/spectra/${id}/pick`, { vbEdge_V: vb, cbEdge_V: cb, reason, version });
      setDraft(null);
      setConflict(null);
      reasonUsed(reason);
      setNotice({ tone: "ok", text: "Correction saved; the phase plot and critical field were refitted." });
      await refresh();
    } catch (e) {
      if (e instanceof ApiError && e.status === 409) {
        const d = e.body?.error?.details as { current: Conflict["current"]; updatedBy: string; updatedAt: string } | undefined;
        setConflict({ message: e.message, current: d?.current ?? { vbEdgeV: null, cbEdgeV: null, version: version + 1 }, updatedBy: d?.updatedBy ?? "someone", updatedAt: d?.updatedAt ?? "" });
        await qc.invalidateQueries({ queryKey: queryKeys.spectrum(id) });
      } else setNotice({ tone: "danger", text: e instanceof ApiError ? e.message : "Not saved." });
    } finally {
      setBusy(false);
    }
  }

  async function setExcluded(excluded: boolean, why = reason) {
    if (!pick) return;
    const text = why.trim() || (excluded ? "excluded during review" : "included during review");
    setBusy(true);
    try {
      await api(lab, "PUT", `/spectra/${id}/exclusion`, { excluded, reason: text, version: pick.version });
      reasonUsed(why);
      setNotice({ tone: "ok", text: excluded ? "Excluded from the fit." : "Included in the fit again." });
      await refresh();
    } catch (e) {
      setNotice({ tone: "danger", text: e instanceof ApiError ? e.message : "Not saved." });
    } finally {
      setBusy(false);
    }
  }

  /** Moves the selected edge by `mV`, inside the bias range and on its side of the other edge. */
  function moveEdge(mV: number) {
    if (vb == null || cb == null) return;
    const d = mV / 1000;
    const gapMin = 1e-4;
    if (selected === "valence") setDraft({ vb: Math.min(Math.max(vb + d, biasRange[0]), cb - gapMin), cb });
    else setDraft({ vb, cb: Math.max(Math.min(cb + d, biasRange[1]), vb + gapMin) });
  }

  /** Accepts the pick as saved (who, when and which version go to its history), then the next spectrum. */
  async function accept() {
    if (!pick) return;
    if (draft) {
      setNotice({ tone: "warn", text: "Save or discard the moved edge first: A accepts the pick as it is saved." });
      return;
    }
    setBusy(true);
    try {
      await api(lab, "POST", `/spectra/${id}/pick/accept`, { version: pick.version });
      await refresh();
      if (data.neighbours.next) go(data.neighbours.next);
      else setNotice({ tone: "ok", text: `Accepted pick v${pick.version}.` });
    } catch (e) {
      setNotice({ tone: "danger", text: e instanceof ApiError ? e.message : "Not accepted." });
    } finally {
      setBusy(false);
    }
  }

  async function undo() {
    if (!pick) return;
    setBusy(true);
    try {
      await api(lab, "POST", `/spectra/${id}/pick/undo`, { version: pick.version });
      setDraft(null);
      setNotice({ tone: "ok", text: "Undone." });
      await refresh();
    } catch (e) {
      setNotice({ tone: "danger", text: e instanceof ApiError ? e.message : "Nothing undone." });
    } finally {
      setBusy(false);
    }
  }

  useEffect(() => {
    const onKey = (e: KeyboardEvent) => {
      const t = e.target as HTMLElement;
      if (t && (t.tagName === "INPUT" || t.tagName === "TEXTAREA" || t.tagName === "SELECT" || t.isContentEditable)) return;
      if (e.metaKey || e.ctrlKey || e.altKey) return;
      if (e.key === "ArrowRight") go(data.neighbours.next);
      else if (e.key === "ArrowLeft") go(data.neighbours.prev);
      else if (e.key === "f" || e.key === "F") go(data.neighbours.nextFlagged);
      else if (!canEdit || busy) return;
      else if (e.key === ",") moveEdge(-FINE_MV);
      else if (e.key === ".") moveEdge(FINE_MV);
      else if (e.key === "<") moveEdge(-COARSE_MV);
      else if (e.key === ">") moveEdge(COARSE_MV);
      else if (e.key === "e" || e.key === "E") setSelected((x) => (x === "valence" ? "conduction" : "valence"));
      else if (e.key === "a" || e.key === "A") void accept();
      else if (e.key === "x" || e.key === "X") void setExcluded(!pick?.excluded).then(() => go(data.neighbours.next));
      else if (e.key === "u" || e.key === "U") void undo();
      else return;
      e.preventDefault();
    };
    window.addEventListener("keydown", onKey);
    return () => window.removeEventListener("keydown", onKey);
  });

  const figure = useMemo(() => {
    const b = data.arrays.bias_V;
    const a = data.analysis;
    const traces: Record<string, unknown>[] = [
      { x: b, y: data.arrays.didv, type: "scatter", mode: "markers", marker: { size: 3, color: "#8a8478" }, name: "raw dI/dV" },
      { x: b, y: a.smoothed, type: "scatter", mode: "lines", line: { color: "#1f6b73", width: 2 }, name: `smoothed (${a.smoothing})` },
    ];
    const shapes: Record<string, unknown>[] = [];
    if (a.noiseFloor != null) shapes.push({ type: "line", xref: "paper", x0: 0, x1: 1, y0: a.noiseFloor, y1: a.noiseFloor, line: { color: "#6e6a5f", width: 1, dash: "dot" }, editable: false });
    if (a.threshold != null) shapes.push({ type: "line", xref: "paper", x0: 0, x1: 1, y0: a.threshold, y1: a.threshold, line: { color: "#b9512a", width: 1, dash: "dash" }, editable: false });
    // The edge the keys move is drawn solid, the other dashed.
    const edgeShape = (x: number, edge: Edge) => ({ type: "line", yref: "paper", x0: x, x1: x, y0: 0, y1: 1, line: { color: "#b9512a", width: 3, dash: canEdit && edge !== selected ? "dash" : "solid" }, editable: canEdit });
    const edgeIndex: number[] = [];
    if (vb != null) {
      edgeIndex.push(shapes.length);
      shapes.push(edgeShape(vb, "valence"));
    }
    if (cb != null) {
      edgeIndex.push(shapes.length);
      shapes.push(edgeShape(cb, "conduction"));
    }
    if (vb != null && cb != null) shapes.push({ type: "rect", yref: "paper", x0: vb, x1: cb, y0: 0, y1: 1, fillcolor: "rgba(185,81,42,0.06)", line: { width: 0 }, editable: false, layer: "below" });
    return {
      data: traces,
      edgeIndex,
      layout: baseLayout({
        xaxis: axis("sample bias (V)"),
        yaxis: axis("dI/dV (as recorded)", logY ? { type: "log" } : {}),
        shapes,
        annotations: [
          ...(a.noiseFloor != null ? [{ xref: "paper", x: 0, y: a.noiseFloor, xanchor: "left", yanchor: "top", text: "noise floor", showarrow: false, font: { size: 10, color: "#6e6a5f" } }] : []),
          ...(a.threshold != null ? [{ xref: "paper", x: 1, y: a.threshold, xanchor: "right", yanchor: "bottom", text: "threshold", showarrow: false, font: { size: 10, color: "#b9512a" } }] : []),
        ],
        uirevision: `${id}-${logY}`,
        dragmode: "zoom",
      }),
    };
  }, [data, vb, cb, logY, canEdit, id, selected]);

  const onRelayout = (e: Record<string, number>) => {
    if (!canEdit || vb == null || cb == null) return;
    const [iv, ic] = figure.edgeIndex;
    const nv = e[`shapes[${iv}].x0`];
    const nc = e[`shapes[${ic}].x0`];
    if (nv === undefined && nc === undefined) return;
    const next = { vb: nv ?? vb, cb: nc ?? cb };
    setDraft(next.vb < next.cb ? next : { vb: next.cb, cb: next.vb });
  };

  const m = data.metadata;
  return (
    <div className="space-y-5" data-testid="spectrum-review" data-spectrum-id={id} data-shown-id={data.id} data-selected-edge={selected}>
      <div className="flex flex-wrap items-center justify-between gap-3">
        <div className="flex items-center gap-2 text-sm">
          <Button type="button" variant="secondary" disabled={!data.neighbours.prev} onClick={() => go(data.neighbours.prev)} aria-keyshortcuts="ArrowLeft">
            ← Previous
          </Button>
          <span className="num text-xs text-muted" data-testid="review-position">
            {data.neighbours.position} of {data.neighbours.total}
          </span>
          <Button type="button" variant="secondary" disabled={!data.neighbours.next} onClick={() => go(data.neighbours.next)} aria-keyshortcuts="ArrowRight">
            Next →
          </Button>
          <Button
            type="button"
            variant="secondary"
            disabled={!data.neighbours.nextFlagged}
            onClick={() => go(data.neighbours.nextFlagged)}
            aria-keyshortcuts="F"
            title={data.neighbours.flagged ? `${data.neighbours.flagged} flagged in this sample (key F)` : "No spectrum of this sample is flagged"}
            data-testid="next-flagged"
          >
            Next flagged ⚑{data.neighbours.flagged ? <span className="num text-xs text-muted"> ({data.neighbours.flagged})</span> : null}
          </Button>
          {isFetching ? <span className="text-xs text-muted">loading…</span> : null}
        </div>
        <label className="inline-flex items-center gap-1.5 text-xs text-ink-soft">
          <input type="checkbox" checked={logY} onChange={(e) => setLogY(e.target.checked)} /> log scale
        </label>
      </div>
      <div className="grid grid-cols-1 gap-5 xl:grid-cols-[minmax(0,2.2fr)_minmax(300px,1fr)]">
        <div className="rounded-xl border border-line bg-card p-3">
          <p className="px-2 pb-1 text-sm font-medium" data-testid="review-file">
            {data.sourceName} <span className="num text-xs font-normal text-muted">#{data.index}{data.label && !data.label.startsWith("spectrum") ? ` · ${data.label}` : ""}</span>
          </p>
          <div className="h-[460px]">
            <Plot
              data={figure.data}
              layout={figure.layout}
              config={{ displaylogo: false, edits: { shapePosition: canEdit }, toImageButtonOptions: { filename: fileStem(`${data.sourceName.replace(/\.[^.]+$/, "")} ${data.index} spectrum`) } }}
              style={{ width: "100%", height: "100%" }}
              onRelayout={onRelayout as never}
            />
          </div>
          {canEdit ? <p className="px-2 pt-1 text-xs text-muted">Drag the copper lines to move the band edges, or type them on the right.</p> : null}
          {/* Keys need a keyboard: not shown on touch screens (coarse pointer, no hover). */}
          <p className="px-2 pt-1 text-xs text-muted [@media(hover:none)]:hidden [@media(pointer:coarse)]:hidden" data-testid="review-keys">
            Keys:{" "}
            {KEY_HELP.filter((k) => canEdit || !k.edit).map((k, i) => (
              <span key={k.keys}>
                {i ? " · " : ""}
                <kbd className="num font-medium text-ink-soft">{k.keys}</kbd> {k.does}
              </span>
            ))}
            .{canEdit ? ` Selected: the ${selected} edge.` : ""}
          </p>
        </div>
        <div className="space-y-4">
          <section className="rounded-xl border border-line bg-card p-4" aria-label="Band edges">
            <div className="flex items-center justify-between">
              <h2 className="text-sm font-semibold">Band edges</h2>
              {pick ? (
                <span className="flex gap-1">
                  {pick.flags.length ? (
                    <Badge tone="copper" title="Quality flags: see below">
                      <span aria-hidden>⚑</span> flagged
                    </Badge>
                  ) : null}
                  {pick.excluded ? <Badge tone="danger">excluded</Badge> : pick.excludedByFlag ? <Badge tone="danger">not in the fit</Badge> : null}
                  {pick.source === "corrected" ? <Badge tone="copper">✎ corrected</Badge> : <Badge title={`method: ${pick.method}`}>auto · {pickMethodInWords(pick.method)}</Badge>}
                  <span className="num text-xs text-muted">v{pick.version}</span>
                </span>
              ) : null}
            </div>
            {pick?.status === "no-gap" && !draft ? <p className="mt-2 text-sm text-ink-soft">No gap: the spectrum looks metallic.</p> : null}
            <dl className="num mt-3 grid grid-cols-2 gap-y-1 text-sm">
              <dt className="text-muted">valence edge</dt>
              <dd data-testid="vb-edge">{mv(vb)}</dd>
              <dt className="text-muted">conduction edge</dt>
              <dd data-testid="cb-edge">{mv(cb)}</dd>
              <dt className="text-muted">gap</dt>
              <dd data-testid="gap">{vb != null && cb != null ? `${((cb - vb) * 1000).toFixed(1)} meV` : formatGap(pick?.gap_eV, pick?.closed)}{pick?.uncertainty_eV != null ? ` ± ${(pick.uncertainty_eV * 1000).toFixed(1)}` : ""}</dd>
              <dt className="text-muted">resolution</dt>
              <dd>{data.analysis.resolution_meV.toFixed(1)} meV</dd>
            </dl>
            {pick?.closed ? <p className="mt-2 text-xs text-teal">Closed within resolution: the gap is below {data.analysis.resolution_meV.toFixed(1)} meV.</p> : null}
            {pick?.source === "corrected" ? (
              <p className="mt-2 text-xs text-muted">
                automatic pick kept: {mv((pick.auto as { vbEdge_V?: number }).vbEdge_V)} to {mv((pick.auto as { cbEdge_V?: number }).cbEdge_V)}
              </p>
            ) : null}
            {pick ? <FlagList flags={pick.flags} corrected={pick.source === "corrected"} excludedByFlag={pick.excludedByFlag} /> : null}
            {canEdit && pick ? (
              <div className="mt-4 space-y-2 border-t border-line pt-3">
                <div className="grid grid-cols-2 items-start gap-2">
                  {/* Keyed by spectrum: text typed for one spectrum never shows on the next. */}
                  <EdgeBox key={`vb-${id}`} label="valence" edge="vb" value={vb} range={biasRange} below={cb} onCommit={(v) => cb != null && setDraft({ vb: v, cb })} />
                  <EdgeBox key={`cb-${id}`} label="conduction" edge="cb" value={cb} range={biasRange} above={vb} onCommit={(v) => vb != null && setDraft({ vb, cb: v })} />
                </div>
                <input ref={reasonRef} className="w-full rounded border border-line px-2 py-1.5 text-sm" placeholder="Reason (required), e.g. onset hidden by a tip state" value={reason} onChange={(e) => setReason(e.target.value)} aria-label="Reason" data-testid="reason-input" />
                {!reason && lastReason ? (
                  <p className="text-xs text-muted" data-testid="reason-suggestion">
                    Same reason as before?{" "}
                    <button type="button" className="text-copper underline-offset-2 hover:underline" onClick={() => setReason(lastReason)}>
                      “{lastReason}”
                    </button>
                  </p>
                ) : null}
                <div className="flex flex-wrap gap-2">
                  <Button type="button" onClick={() => saveCorrection()} disabled={busy || !draft} data-testid="save-correction">
                    Save correction
                  </Button>
                  {draft ? (
                    <Button type="button" variant="ghost" onClick={() => setDraft(null)}>
                      Discard
                    </Button>
                  ) : null}
                  <Button type="button" variant="secondary" onClick={() => setExcluded(!pick.excluded)} disabled={busy} data-testid="toggle-exclude">
                    {pick.excluded ? "Include" : "Exclude"}
                  </Button>
                  <Button type="button" variant="ghost" onClick={undo} disabled={busy || history.length === 0}>
                    Undo
                  </Button>
                </div>
              </div>
            ) : null}
            {conflict ? (
              <div className="mt-3" data-testid="conflict">
                <Notice tone="danger">
                  <p>{conflict.message}</p>
                  <p className="num mt-1 text-xs">
                    Their pick: {mv(conflict.current.vbEdgeV)} to {mv(conflict.current.cbEdgeV)}. Yours (kept): {mv(vb)} to {mv(cb)}.
                  </p>
                  <button type="button" className="mt-2 text-xs font-medium underline" onClick={() => saveCorrection(conflict.current.version)}>
                    Re-apply my edit on top of theirs
                  </button>
                </Notice>
              </div>
            ) : null}
            {notice ? (
              <div className="mt-3">
                <Notice tone={notice.tone}>{notice.text}</Notice>
              </div>
            ) : null}
          </section>
          <section className="rounded-xl border border-line bg-card p-4 text-sm" aria-label="Spectrum">
            <h2 className="text-sm font-semibold">Where this number comes from</h2>
            <dl className="mt-2 grid grid-cols-[auto_1fr] gap-x-3 gap-y-1 text-xs">
              <dt className="text-muted">file</dt>
              <dd className="break-all">
                {data.sourceName} #{data.index}
              </dd>
              <dt className="text-muted">SHA-256</dt>
              <dd className="num break-all" title={data.upload.sha256}>
                {data.upload.sha256.slice(0, 16)}…
              </dd>
              <dt className="text-muted">setpoint</dt>
              <dd className="num">{m.setpointBias_V != null && m.setpointCurrent_A != null ? `${m.setpointBias_V} V, ${(m.setpointCurrent_A * 1e12).toPrecision(4)} pA` : "not recorded"}</dd>
              <dt className="text-muted">T, lock-in</dt>
              <dd className="num">
                {data.analysis.temperature_K} K, {data.analysis.lockinModulation_mV_rms} mV rms
              </dd>
              <dt className="text-muted">distance</dt>
              <dd className="num">{data.distance_nm != null ? `${data.distance_nm.toFixed(3)} ± ${(data.distanceSigma_nm ?? 0).toFixed(3)} nm` : "—"}</dd>
              <dt className="text-muted">field (estimate)</dt>
              <dd className="num">{data.field_V_per_nm != null ? `${data.field_V_per_nm.toFixed(3)} ± ${(data.fieldSigma_V_per_nm ?? 0).toFixed(3)} V/nm` : "—"}</dd>
              <dt className="text-muted">region, tip</dt>
              <dd>{m.region ?? "—"}, {m.tipLabel ?? "—"}</dd>
              <dt className="text-muted">versions</dt>
              <dd className="num">
                settings v{data.versions.extractionSettings?.version ?? "?"}, field model v{data.versions.fieldModel?.version ?? "?"}
              </dd>
            </dl>
            {data.warnings.length ? (
              <ul className="mt-2 list-disc pl-4 text-xs text-copper">
                {data.warnings.map((w, i) => (
                  <li key={i}>{w}</li>
                ))}
              </ul>
            ) : null}
            <p className="mt-3 text-xs">
              <Link className="underline" href={`/labs/${lab}/samples/${data.sampleId}`}>
                Back to {data.sampleName}
              </Link>
            </p>
          </section>
          {history.length ? (
            <section className="rounded-xl border border-line bg-card p-4" aria-label="History">
              <h2 className="text-sm font-semibold">History</h2>
              <ol className="mt-2 space-y-2 text-xs" data-testid="pick-history">
                {history.map((h) => (
                  <li key={h.id}>
                    <span className="font-medium">{h.actorName ?? "someone"}</span> · {h.action === "accept" ? `accepted pick v${String(h.after.version)}` : h.action} ·{" "}
                    <span className="num text-muted">{formatUtc(h.at)}</span>
                    {h.action === "correct" ? (
                      <span className="num block text-ink-soft">
                        {mv(h.before.vbEdgeV as number)}–{mv(h.before.cbEdgeV as number)} → {mv(h.after.vbEdgeV as number)}–{mv(h.after.cbEdgeV as number)}
                      </span>
                    ) : null}
                    {h.reason ? <span className="block text-ink-soft">“{h.reason}”</span> : null}
                  </li>
                ))}
              </ol>
            </section>
          ) : null}
        </div>
      </div>
    </div>
  );
}
