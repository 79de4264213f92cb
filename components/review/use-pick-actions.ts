"use client";

import { useQueryClient } from "@tanstack/react-query";
import { useRef, useState } from "react";
import { api, ApiError } from "@/lib/api-client";
import { queryKeys } from "@/lib/query-keys";
import type { Edges, SpectrumData } from "./review-figure";

export type Conflict = {
  message: string;
  current: { vbEdgeV: number | null; cbEdgeV: number | null; version: number };
  updatedBy: string;
  updatedAt: string;
};
export type ReviewNotice = { tone: "ok" | "danger" | "warn"; text: string };

const failed = (e: unknown, fallback: string) => (e instanceof ApiError ? e.message : fallback);

/**
 * What an analyst does to the shown pick (correct, exclude or include, accept, undo) and the state
 * around it: the reason box, the last reason (offered, never filled in), busy, the notice and a
 * stale save's conflict. Each action refreshes the spectrum and the sample's phase data.
 */
export function usePickActions(o: {
  lab: string;
  id: string;
  data: SpectrumData;
  draft: Edges | null;
  setDraft: (d: Edges | null) => void;
  go: (id: string | null) => void;
}) {
  const { lab, id, data, draft, setDraft, go } = o;
  const qc = useQueryClient();
  const pick = data.pick;
  // A reason belongs to one action on one spectrum: emptied when the spectrum changes and after
  // a save; the last one used is only offered as a suggestion to click.
  const [reason, setReason] = useState("");
  const [lastReason, setLastReason] = useState<string | null>(null);
  const [busy, setBusy] = useState(false);
  const [notice, setNotice] = useState<ReviewNotice | null>(null);
  const [conflict, setConflict] = useState<Conflict | null>(null);
  const reasonRef = useRef<HTMLInputElement>(null);
  const reasonUsed = (text: string) => {
    if (text.trim()) setLastReason(text.trim());
    setReason("");
  };
  // Moving to another spectrum forgets the reason, the notice and the conflict (in the same render).
  const [shownId, setShownId] = useState(id);
  if (shownId !== id) {
    setShownId(id);
    setReason("");
    setConflict(null);
    setNotice(null);
  }
  const refresh = async () => {
    await qc.invalidateQueries({ queryKey: queryKeys.spectrum(id) });
    await qc.invalidateQueries({ queryKey: queryKeys.phase(data.sampleId) });
  };
  /** Runs one request with the busy mark; a failure becomes the notice. */
  const run = async (work: () => Promise<void>, fallback: string, onError?: (e: unknown) => Promise<boolean>) => {
    setBusy(true);
    try {
      await work();
    } catch (e) {
      if (!(await onError?.(e))) setNotice({ tone: "danger", text: failed(e, fallback) });
    } finally {
      setBusy(false);
    }
  };
  const vb = draft?.vb ?? pick?.vbEdge_V ?? null;
  const cb = draft?.cb ?? pick?.cbEdge_V ?? null;

  async function saveCorrection(version = pick?.version) {
    if (!pick || vb == null || cb == null || version == null) return;
    if (reason.trim().length < 3) {
      setNotice({ tone: "warn", text: "Give a reason for the correction (it is kept in the history)." });
      reasonRef.current?.focus();
      return;
    }
    await run(
      async () => {
        await api(lab, "PATCH", `/spectra/${id}/pick`, { vbEdge_V: vb, cbEdge_V: cb, reason, version });
        setDraft(null);
        setConflict(null);
        reasonUsed(reason);
        setNotice({ tone: "ok", text: "Correction saved; the phase plot and critical field were refitted." });
        await refresh();
      },
      "Not saved.",
      async (e) => {
        if (!(e instanceof ApiError && e.status === 409)) return false;
        const d = e.body?.error?.details as
          { current: Conflict["current"]; updatedBy: string; updatedAt: string } | undefined;
        setConflict({
          message: e.message,
          current: d?.current ?? { vbEdgeV: null, cbEdgeV: null, version: version + 1 },
          updatedBy: d?.updatedBy ?? "someone",
          updatedAt: d?.updatedAt ?? "",
        });
        await qc.invalidateQueries({ queryKey: queryKeys.spectrum(id) });
        return true;
      },
    );
  }

  async function setExcluded(excluded: boolean, why = reason) {
    if (!pick) return;
    const text = why.trim() || (excluded ? "excluded during review" : "included during review");
    await run(async () => {
      await api(lab, "PUT", `/spectra/${id}/exclusion`, { excluded, reason: text, version: pick.version });
      reasonUsed(why);
      setNotice({ tone: "ok", text: excluded ? "Excluded from the fit." : "Included in the fit again." });
      await refresh();
    }, "Not saved.");
  }

  /** Accepts the pick as saved (who, when and which version go to its history), then the next spectrum. */
  async function accept() {
    if (!pick) return;
    if (draft) {
      setNotice({ tone: "warn", text: "Save or discard the moved edge first: A accepts the pick as it is saved." });
      return;
    }
    await run(async () => {
      await api(lab, "POST", `/spectra/${id}/pick/accept`, { version: pick.version });
      await refresh();
      if (data.neighbours.next) go(data.neighbours.next);
      else setNotice({ tone: "ok", text: `Accepted pick v${pick.version}.` });
    }, "Not accepted.");
  }

  async function undo() {
    if (!pick) return;
    await run(async () => {
      await api(lab, "POST", `/spectra/${id}/pick/undo`, { version: pick.version });
      setDraft(null);
      setNotice({ tone: "ok", text: "Undone." });
      await refresh();
    }, "Nothing undone.");
  }

  return {
    vb,
    cb,
    reason,
    setReason,
    lastReason,
    reasonRef,
    busy,
    notice,
    conflict,
    saveCorrection,
    setExcluded,
    accept,
    undo,
  };
}

export type PickActions = ReturnType<typeof usePickActions>;
