"use client";

import { useQuery, useQueryClient } from "@tanstack/react-query";
import { useCallback, useEffect, useMemo, useState } from "react";
import { Plot } from "@/components/plots/plot";
import { Button } from "@/components/ui/button";
import { api } from "@/lib/api-client";
import { fileStem, spectrumIndex } from "@/lib/format";
import { queryKeys } from "@/lib/query-keys";
import { AverageMembers } from "./average-members";
import { BandEdgesCard } from "./band-edges-card";
import { type History, PickHistory } from "./pick-history";
import {
  draggedEdges,
  type Edge,
  type Edges,
  movedEdge,
  pickedView,
  reviewFigure,
  type ReviewView,
  type SpectrumData,
  viewValues,
} from "./review-figure";
import { ReviewViewSwitch, ViewCaption } from "./review-view-switch";
import { KeyHelp, useReviewKeys } from "./review-keys";
import { SpectrumProvenance } from "./spectrum-provenance";
import { usePickActions } from "./use-pick-actions";

export type { SpectrumData };

/** Previous, position, next and next flagged; the loading mark. */
function ReviewNav({ data, go, loading }: { data: SpectrumData; go: (id: string | null) => void; loading: boolean }) {
  const n = data.neighbours;
  return (
    <div className="flex items-center gap-2 text-sm">
      <Button
        type="button"
        variant="secondary"
        disabled={!n.prev}
        onClick={() => go(n.prev)}
        aria-keyshortcuts="ArrowLeft"
      >
        ← Previous
      </Button>
      <span className="num text-xs text-muted" data-testid="review-position">
        {n.position} of {n.total}
      </span>
      <Button
        type="button"
        variant="secondary"
        disabled={!n.next}
        onClick={() => go(n.next)}
        aria-keyshortcuts="ArrowRight"
      >
        Next →
      </Button>
      <Button
        type="button"
        variant="secondary"
        disabled={!n.nextFlagged}
        onClick={() => go(n.nextFlagged)}
        aria-keyshortcuts="F"
        title={n.flagged ? `${n.flagged} flagged in this sample (key F)` : "No spectrum of this sample is flagged"}
        data-testid="next-flagged"
      >
        Next flagged ⚑{n.flagged ? <span className="num text-xs text-muted"> ({n.flagged})</span> : null}
      </Button>
      {loading ? <span className="text-xs text-muted">loading…</span> : null}
    </div>
  );
}

/**
 * The review screen of one spectrum: raw and smoothed dI/dV (linear or log), noise floor and
 * threshold, the energy resolution, and the two band edges as lines the analyst drags. Saving a
 * correction needs a reason and keeps the automatic pick and the history; a stale save gets the
 * conflict message and the edit stays on screen. The pick's quality flags sit under its numbers.
 * Keys (`review-keys.tsx`): ← → move between spectra; F the next flagged one; , . and < > move the
 * selected edge by 1 and 10 mV, E selects the other edge; A accepts the pick as it is (recorded in
 * its history) and moves on; X excludes or includes; U undoes.
 */
export function SpectrumReview({ lab, initial, canEdit }: { lab: string; initial: SpectrumData; canEdit: boolean }) {
  const qc = useQueryClient();
  const [id, setId] = useState(initial.id);
  const fetchSpectrum = useCallback((sid: string) => api<SpectrumData>(lab, "GET", `/spectra/${sid}`), [lab]);
  const { data = initial, isFetching } = useQuery({
    queryKey: queryKeys.spectrum(id),
    queryFn: () => fetchSpectrum(id),
    initialData: id === initial.id ? initial : undefined,
    staleTime: 30_000,
  });
  const { data: history = [] } = useQuery({
    queryKey: [...queryKeys.spectrum(id), "history"],
    queryFn: async () => (await api<{ history: History }>(lab, "GET", `/spectra/${id}/pick`)).history,
  });
  const [draft, setDraft] = useState<Edges | null>(null);
  const [logY, setLogY] = useState(false);
  // The view the pick was made on, until the analyst switches.
  const [chosenView, setView] = useState<ReviewView | null>(null);
  const view = chosenView && viewValues(data, chosenView) ? chosenView : pickedView(data);
  const [selected, setSelected] = useState<Edge>("valence");

  // Prefetch the neighbours so moving through a sample is instant.
  const { next, prev, nextFlagged } = data.neighbours;
  useEffect(() => {
    for (const n of [next, prev, nextFlagged])
      if (n)
        void qc.prefetchQuery({ queryKey: queryKeys.spectrum(n), queryFn: () => fetchSpectrum(n), staleTime: 30_000 });
  }, [next, prev, nextFlagged, qc, fetchSpectrum]);

  const go = useCallback(
    (target: string | null) => {
      if (!target) return;
      setId(target);
      setDraft(null);
      window.history.replaceState(null, "", `/labs/${lab}/spectra/${target}`);
    },
    [lab],
  );
  const actions = usePickActions({ lab, id, data, draft, setDraft, go });
  const { vb, cb } = actions;
  const bias = data.arrays.bias_V;
  const biasRange: [number, number] = [bias[0], bias[bias.length - 1]];

  useReviewKeys(
    {
      prev: () => go(prev),
      next: () => go(next),
      nextFlagged: () => go(nextFlagged),
      move: (mV) => vb != null && cb != null && setDraft(movedEdge({ vb, cb }, selected, mV, biasRange)),
      switchEdge: () => setSelected((x) => (x === "valence" ? "conduction" : "valence")),
      accept: () => void actions.accept(),
      toggleExcluded: () => void actions.setExcluded(!data.pick?.excluded).then(() => go(next)),
      undo: () => void actions.undo(),
    },
    canEdit && !actions.busy,
  );

  const figure = useMemo(
    () => reviewFigure(data, { vb, cb, logY, canEdit, id, selected, view }),
    [data, vb, cb, logY, canEdit, id, selected, view],
  );
  const onRelayout = (e: Record<string, number>) => {
    if (!canEdit || vb == null || cb == null) return;
    const moved = draggedEdges(e, figure.edgeIndex, { vb, cb });
    if (moved) setDraft(moved);
  };
  const label = data.label && !data.label.startsWith("spectrum") ? ` · ${data.label}` : "";

  return (
    <div
      className="space-y-5"
      data-testid="spectrum-review"
      data-spectrum-id={id}
      data-shown-id={data.id}
      data-selected-edge={selected}
    >
      <div className="flex flex-wrap items-center justify-between gap-3">
        <ReviewNav data={data} go={go} loading={isFetching} />
        <ReviewViewSwitch data={data} view={view} setView={setView} logY={logY} setLogY={setLogY} />
      </div>
      <div className="grid grid-cols-1 gap-5 xl:grid-cols-[minmax(0,2.2fr)_minmax(300px,1fr)]">
        <div className="rounded-xl border border-line bg-card p-3">
          <p className="px-2 pb-1 text-sm font-medium" data-testid="review-file">
            {data.sourceName}{" "}
            <span className="num text-xs font-normal text-muted">
              {spectrumIndex(data.index)}
              {label}
            </span>
          </p>
          <div className="h-[460px]">
            <Plot
              data={figure.data}
              layout={figure.layout}
              config={{
                displaylogo: false,
                edits: { shapePosition: canEdit },
                toImageButtonOptions: {
                  filename: fileStem(`${data.sourceName.replace(/\.[^.]+$/, "")} ${data.index} spectrum`),
                },
              }}
              style={{ width: "100%", height: "100%" }}
              onRelayout={onRelayout as never}
            />
          </div>
          <ViewCaption data={data} view={view} />
          {canEdit ? (
            <p className="px-2 pt-1 text-xs text-muted">
              Drag the copper lines to move the band edges, or type them on the right.
            </p>
          ) : null}
          <KeyHelp canEdit={canEdit} selected={selected} />
        </div>
        <div className="space-y-4">
          <BandEdgesCard
            id={id}
            data={data}
            canEdit={canEdit}
            draft={draft}
            setDraft={setDraft}
            range={biasRange}
            actions={actions}
            canUndo={history.length > 0}
          />
          <AverageMembers lab={lab} data={data} canEdit={canEdit} go={go} />
          <SpectrumProvenance lab={lab} data={data} />
          <PickHistory history={history} />
        </div>
      </div>
    </div>
  );
}
