"use client";

import { Badge } from "@/components/ui/badge";
import { Button } from "@/components/ui/button";
import { Notice } from "@/components/ui/card";
import { formatGap, formatMv as mv, pickMethodInWords } from "@/lib/format";
import { EdgeBox } from "./edge-box";
import { FlagList } from "./quality-flags";
import type { Edges, SpectrumData } from "./review-figure";
import type { PickActions } from "./use-pick-actions";

type Pick = NonNullable<SpectrumData["pick"]>;

/** The pick's badges: flagged, excluded or left out, corrected or automatic (with its method), version. */
function PickBadges({ pick }: { pick: Pick }) {
  return (
    <span className="flex gap-1">
      {pick.flags.length ? (
        <Badge tone="copper" title="Quality flags: see below">
          <span aria-hidden>⚑</span> flagged
        </Badge>
      ) : null}
      {pick.excluded ? (
        <Badge tone="danger">excluded</Badge>
      ) : pick.excludedByFlag ? (
        <Badge tone="danger">not in the fit</Badge>
      ) : null}
      {pick.source === "corrected" ? (
        <Badge tone="copper">✎ corrected</Badge>
      ) : (
        <Badge title={`method: ${pick.method}`}>auto · {pickMethodInWords(pick.method)}</Badge>
      )}
      <span className="num text-xs text-muted">v{pick.version}</span>
    </span>
  );
}

/** The edges, the gap with its uncertainty and the resolution, as numbers. */
function EdgeNumbers({
  pick,
  vb,
  cb,
  resolution_meV,
}: {
  pick: SpectrumData["pick"];
  vb: number | null;
  cb: number | null;
  resolution_meV: number;
}) {
  const gap = vb != null && cb != null ? `${((cb - vb) * 1000).toFixed(1)} meV` : formatGap(pick?.gap_eV, pick?.closed);
  return (
    <dl className="num mt-3 grid grid-cols-2 gap-y-1 text-sm">
      <dt className="text-muted">valence edge</dt>
      <dd data-testid="vb-edge">{mv(vb)}</dd>
      <dt className="text-muted">conduction edge</dt>
      <dd data-testid="cb-edge">{mv(cb)}</dd>
      <dt className="text-muted">gap</dt>
      <dd data-testid="gap">
        {gap}
        {pick?.uncertainty_eV != null ? ` ± ${(pick.uncertainty_eV * 1000).toFixed(1)}` : ""}
      </dd>
      <dt className="text-muted">resolution</dt>
      <dd>{resolution_meV.toFixed(1)} meV</dd>
    </dl>
  );
}

/** Typing the edges, the reason, and the buttons that save, discard, exclude or undo. */
function EditControls(props: {
  id: string;
  pick: Pick;
  draft: Edges | null;
  setDraft: (d: Edges | null) => void;
  range: [number, number];
  actions: PickActions;
  canUndo: boolean;
}) {
  const { id, pick, draft, setDraft, range, actions: a, canUndo } = props;
  const { vb, cb } = a;
  return (
    <div className="mt-4 space-y-2 border-t border-line pt-3">
      <div className="grid grid-cols-2 items-start gap-2">
        {/* Keyed by spectrum: text typed for one spectrum never shows on the next. */}
        <EdgeBox
          key={`vb-${id}`}
          label="valence"
          edge="vb"
          value={vb}
          range={range}
          below={cb}
          onCommit={(v) => cb != null && setDraft({ vb: v, cb })}
        />
        <EdgeBox
          key={`cb-${id}`}
          label="conduction"
          edge="cb"
          value={cb}
          range={range}
          above={vb}
          onCommit={(v) => vb != null && setDraft({ vb, cb: v })}
        />
      </div>
      <input
        ref={a.reasonRef}
        className="w-full rounded border border-line px-2 py-1.5 text-sm"
        placeholder="Reason (required), e.g. onset hidden by a tip state"
        value={a.reason}
        onChange={(e) => a.setReason(e.target.value)}
        aria-label="Reason"
        data-testid="reason-input"
      />
      {!a.reason && a.lastReason ? (
        <p className="text-xs text-muted" data-testid="reason-suggestion">
          Same reason as before?{" "}
          <button
            type="button"
            className="text-copper underline-offset-2 hover:underline"
            onClick={() => a.setReason(a.lastReason!)}
          >
            “{a.lastReason}”
          </button>
        </p>
      ) : null}
      <div className="flex flex-wrap gap-2">
        <Button
          type="button"
          onClick={() => a.saveCorrection()}
          disabled={a.busy || !draft}
          data-testid="save-correction"
        >
          Save correction
        </Button>
        {draft ? (
          <Button type="button" variant="ghost" onClick={() => setDraft(null)}>
            Discard
          </Button>
        ) : null}
        <Button
          type="button"
          variant="secondary"
          onClick={() => a.setExcluded(!pick.excluded)}
          disabled={a.busy}
          data-testid="toggle-exclude"
        >
          {pick.excluded ? "Include" : "Exclude"}
        </Button>
        <Button type="button" variant="ghost" onClick={a.undo} disabled={a.busy || !canUndo}>
          Undo
        </Button>
      </div>
    </div>
  );
}

/**
 * The band edges card: the pick's badges and numbers, its quality flags, and for those who may
 * edit, the typed edges, the reason and the actions; a stale save's conflict and the last notice.
 */
export function BandEdgesCard(props: {
  id: string;
  data: SpectrumData;
  canEdit: boolean;
  draft: Edges | null;
  setDraft: (d: Edges | null) => void;
  range: [number, number];
  actions: PickActions;
  canUndo: boolean;
}) {
  const { data, canEdit, draft, actions: a } = props;
  const pick = data.pick;
  const resolution = data.analysis.resolution_meV;
  const auto = pick?.auto as { vbEdge_V?: number; cbEdge_V?: number } | undefined;
  return (
    <section className="rounded-xl border border-line bg-card p-4" aria-label="Band edges">
      <div className="flex items-center justify-between">
        <h2 className="text-sm font-semibold">Band edges</h2>
        {pick ? <PickBadges pick={pick} /> : null}
      </div>
      {pick?.status === "no-gap" && !draft ? (
        <p className="mt-2 text-sm text-ink-soft">No gap: the spectrum looks metallic.</p>
      ) : null}
      <EdgeNumbers pick={pick} vb={a.vb} cb={a.cb} resolution_meV={resolution} />
      {pick?.closed ? (
        <p className="mt-2 text-xs text-teal">
          Closed within resolution: the gap is below {resolution.toFixed(1)} meV.
        </p>
      ) : null}
      {pick?.source === "corrected" ? (
        <p className="mt-2 text-xs text-muted">
          automatic pick kept: {mv(auto?.vbEdge_V)} to {mv(auto?.cbEdge_V)}
        </p>
      ) : null}
      {pick ? (
        <FlagList flags={pick.flags} corrected={pick.source === "corrected"} excludedByFlag={pick.excludedByFlag} />
      ) : null}
      {canEdit && pick ? <EditControls {...props} pick={pick} /> : null}
      {a.conflict ? (
        <div className="mt-3" data-testid="conflict">
          <Notice tone="danger">
            <p>{a.conflict.message}</p>
            <p className="num mt-1 text-xs">
              {`Their pick: ${mv(a.conflict.current.vbEdgeV)} to ${mv(a.conflict.current.cbEdgeV)}. `}
              {`Yours (kept): ${mv(a.vb)} to ${mv(a.cb)}.`}
            </p>
            <button
              type="button"
              className="mt-2 text-xs font-medium underline"
              onClick={() => a.saveCorrection(a.conflict!.current.version)}
            >
              Re-apply my edit on top of theirs
            </button>
          </Notice>
        </div>
      ) : null}
      {a.notice ? (
        <div className="mt-3">
          <Notice tone={a.notice.tone}>{a.notice.text}</Notice>
        </div>
      ) : null}
    </section>
  );
}
