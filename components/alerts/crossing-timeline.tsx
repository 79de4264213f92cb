"use client";

import { useQuery, useQueryClient } from "@tanstack/react-query";
import { useState, useTransition } from "react";
import { formatUtc } from "@/lib/format";
import { confirmCrossingAction } from "@/lib/actions/alerts";
import { usePhaseOf } from "@/components/review/sample-queries";
import type { PhaseData } from "@/components/review/phase-figure";
import { queryKeys } from "@/lib/query-keys";
import { alertKeys, getJson } from "./query";

type Kind = "found" | "moved" | "confirmed";
interface TimelineData {
  events: {
    id: string;
    kind: Kind;
    field_V_per_nm: number;
    ci95_V_per_nm: [number, number] | null;
    nPoints: number | null;
    settingsVersion: number | null;
    fieldModelVersion: number | null;
    confirmedBy: string | null;
    createdAt: string;
  }[];
  current: {
    id: string;
    state: string;
    status: string;
    field_V_per_nm: number | null;
    ci95_V_per_nm: [number, number] | null;
    nPoints: number;
    confirmable: boolean;
  } | null;
  canConfirm: boolean;
}

const LABEL: Record<Kind, string> = {
  found: "Critical field found",
  moved: "Moved outside the interval",
  confirmed: "Confirmed",
};
const MARK: Record<Kind, { sign: string; tone: string }> = {
  found: { sign: "✕", tone: "bg-copper text-white" },
  moved: { sign: "↔", tone: "bg-teal text-white" },
  confirmed: { sign: "✓", tone: "bg-ok text-white" },
};

const field = (v: number | null, ci: [number, number] | null, digits = 2) => (v == null ? "—" : `${v.toFixed(digits)} V/nm${ci ? ` [${ci[0].toFixed(digits)}, ${ci[1].toFixed(digits)}]` : ""}`);
const when = formatUtc;

type PhaseCrossing = PhaseData["crossing"];
/**
 * The crossing Confirm acts on, from the phase query the critical-field card and the plot read: null when there is
 * nothing to confirm.
 */
const confirmable = (c: PhaseCrossing) =>
  "id" in c && c.state === "crossed" && c.found && c.field_V_per_nm != null && c.status !== "confirmed"
    ? { id: c.id, field_V_per_nm: c.field_V_per_nm, ci95_V_per_nm: c.ci95_V_per_nm }
    : null;

/**
 * The sample's crossing events, newest first, and the analyst's "confirm" for the current fit.
 * Confirm shows and sends the crossing of the phase query (the one the critical-field card shows):
 * its id and value travel with the click, and a fit that changed meanwhile is refused with the
 * current value, after which the page's data is refreshed.
 */
export function CrossingTimeline({
  lab,
  sampleId,
  initialCrossing,
}: {
  lab: string;
  sampleId: string;
  initialCrossing: PhaseCrossing;
}) {
  const qc = useQueryClient();
  const [pending, start] = useTransition();
  const [message, setMessage] = useState<{ ok: boolean; text: string } | null>(null);
  const q = useQuery({
    queryKey: alertKeys.timeline(sampleId),
    queryFn: () => getJson<TimelineData>(`/api/v1/samples/${sampleId}/crossing/events?lab=${encodeURIComponent(lab)}`),
  });
  const current = usePhaseOf(lab, sampleId, (p) => confirmable(p.crossing), confirmable(initialCrossing));
  const confirm = (c: NonNullable<typeof current>) =>
    start(async () => {
      const state = await confirmCrossingAction(lab, sampleId, c.id, c.field_V_per_nm);
      setMessage({ ok: state.ok, text: state.message ?? (state.ok ? "Confirmed." : "That did not work.") });
      await qc.invalidateQueries({ queryKey: queryKeys.sample(sampleId) });
    });
  const d = q.data;
  return (
    <section
      className="rounded-xl border border-line bg-card"
      data-testid="crossing-timeline"
      aria-labelledby="crossing-timeline-title"
    >
      <header className="flex flex-wrap items-center justify-between gap-3 border-b border-line px-5 py-3.5">
        <h2 id="crossing-timeline-title" className="text-sm font-semibold tracking-wide text-ink">
          Critical-field alerts
        </h2>
        {current && d?.canConfirm ? (
          <button
            type="button"
            data-testid="confirm-crossing"
            data-crossing-id={current.id}
            disabled={pending}
            onClick={() => confirm(current)}
            className="rounded-md bg-ink px-3 py-1.5 text-sm font-medium text-white hover:bg-night disabled:opacity-70"
            title="Confirm the critical field shown on this page; everyone watching the sample is told."
          >
            {pending ? "Confirming…" : `Confirm ${field(current.field_V_per_nm, current.ci95_V_per_nm, 3)}`}
          </button>
        ) : null}
      </header>
      <div className="p-5">
        {message ? (
          <p role="status" className={`mb-3 text-sm ${message.ok ? "text-ok" : "text-danger"}`}>
            {message.text}
          </p>
        ) : null}
        {q.isPending ? (
          <p className="text-sm text-muted">Loading…</p>
        ) : q.isError ? (
          <p role="alert" className="text-sm text-danger">
            {(q.error as Error).message}
          </p>
        ) : !d || d.events.length === 0 ? (
          <p className="text-sm text-ink-soft">
            No alerts yet. When a fit first shows the gap closing and reopening, everyone watching this sample gets an
            e-mail; again if a later fit moves the critical field outside its 95% interval, and when an analyst confirms
            it.
          </p>
        ) : (
          <ol className="relative space-y-4 border-l border-line pl-5">
            {d.events.map((e) => (
              <li key={e.id} className="relative" data-testid={`crossing-event-${e.kind}`}>
                <span
                  className={
                    `absolute -left-[30px] top-0.5 flex h-5 w-5 items-center ` +
                    `justify-center rounded-full text-[11px] ${MARK[e.kind].tone}`
                  }
                  aria-hidden
                >
                  {MARK[e.kind].sign}
                </span>
                <p className="text-sm font-medium text-ink">
                  {LABEL[e.kind]} <span className="num font-normal">{field(e.field_V_per_nm, e.ci95_V_per_nm)}</span>
                </p>
                <p className="text-xs text-muted">
                  <time dateTime={e.createdAt}>{when(e.createdAt)}</time>
                  {e.nPoints != null ? ` · ${e.nPoints} spectra` : ""} · settings v{e.settingsVersion ?? "?"}, field
                  model v{e.fieldModelVersion ?? "?"}
                  {e.confirmedBy ? ` · by ${e.confirmedBy}` : ""}
                </p>
              </li>
            ))}
          </ol>
        )}
        <p className="mt-4 text-xs text-muted">
          Fields are estimates from the field model (work functions and contact distance), not measurements.
        </p>
      </div>
    </section>
  );
}
