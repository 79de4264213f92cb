"use client";

import { useQuery, useQueryClient } from "@tanstack/react-query";
import { useState, useTransition } from "react";
import { watchSampleAction } from "@/lib/actions/alerts";
import { alertKeys, getJson } from "./query";

/**
 * Watch a sample: e-mail and an in-app notification when its critical field is found, moves
 * outside its interval or is confirmed. A toggle button (aria-pressed) that says what it does.
 */
const WATCH_BUTTON =
  "inline-flex items-center gap-2 whitespace-nowrap rounded-md border px-3.5 py-2 text-sm font-medium " +
  "transition-colors disabled:opacity-70";

export function WatchToggle({ lab, sampleId }: { lab: string; sampleId: string }) {
  const qc = useQueryClient();
  const [pending, start] = useTransition();
  const [error, setError] = useState<string | null>(null);
  const q = useQuery({
    queryKey: alertKeys.watch(sampleId),
    queryFn: () => getJson<{ watching: boolean }>(`/api/v1/samples/${sampleId}/watch?lab=${encodeURIComponent(lab)}`),
  });
  const watching = q.data?.watching ?? false;
  const toggle = () =>
    start(async () => {
      setError(null);
      const state = await watchSampleAction(lab, sampleId, !watching);
      if (!state.ok) return setError(state.message ?? "That did not work.");
      qc.setQueryData(alertKeys.watch(sampleId), { watching: !watching });
    });
  return (
    <span className="inline-flex items-center gap-2">
      <button
        type="button"
        data-testid="watch-toggle"
        aria-pressed={watching}
        disabled={q.isPending || pending}
        onClick={toggle}
        title={
          watching
            ? "You get an e-mail when this sample's critical field is found, moves or is confirmed."
            : "Get an e-mail when this sample's critical field is found, moves or is confirmed."
        }
        className={`${WATCH_BUTTON} ${
          watching
            ? "border-copper/40 bg-copper-soft text-copper hover:brightness-95"
            : "border-line bg-card text-ink hover:border-ink-soft"
        }`}
      >
        <span aria-hidden>{watching ? "●" : "○"}</span>
        {q.isPending ? "Watch" : watching ? "Watching" : "Watch"}
      </button>
      {error ? (
        <span role="alert" className="text-xs text-danger">
          {error}
        </span>
      ) : null}
    </span>
  );
}
