"use client";

import { useMutation, useQueryClient } from "@tanstack/react-query";
import Link from "next/link";
import { useState } from "react";
import { Notice } from "@/components/ui/card";
import { api, ApiError } from "@/lib/api-client";
import { queryKeys } from "@/lib/query-keys";

type Averaged = { id: string; leftOut: string[]; warnings: string[] };

/**
 * "Average" for the selected spectra of the session's table: the server refuses mismatched ones with
 * the reason (shown as the table's error), and an average made is announced with a link to it and
 * what was left out.
 */
export function useAverage(o: { lab: string; sessionId: string; sampleId: string; onError: (m: string | null) => void }) {
  const qc = useQueryClient();
  const [made, setMade] = useState<Averaged | null>(null);
  const mutation = useMutation({
    mutationFn: (ids: string[]) => api<Averaged>(o.lab, "POST", "/spectra/average", { ids }),
    onSuccess: (r) => {
      o.onError(null);
      setMade(r);
      void qc.invalidateQueries({ queryKey: queryKeys.sessionSpectra(o.sessionId) });
      void qc.invalidateQueries({ queryKey: queryKeys.phase(o.sampleId) });
    },
    onError: (e) => {
      setMade(null);
      o.onError(e instanceof ApiError ? e.message : "The spectra were not averaged.");
    },
  });
  const notice = made ? (
    <Notice tone="info">
      <span data-testid="average-made">
        Averaged into one spectrum
        {made.leftOut.length ? `, ${made.leftOut.length} repeat left out (differs beyond the noise)` : ""}.{" "}
        <Link className="underline" href={`/labs/${o.lab}/spectra/${made.id}`}>
          Open the average
        </Link>
      </span>
    </Notice>
  ) : null;
  return { average: (ids: string[]) => mutation.mutate(ids), averaging: mutation.isPending, notice };
}
