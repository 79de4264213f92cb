"use client";

import { useMutation, useQueryClient } from "@tanstack/react-query";
import Link from "next/link";
import { useState } from "react";
import { Button } from "@/components/ui/button";
import { api, ApiError } from "@/lib/api-client";
import { queryKeys } from "@/lib/query-keys";
import type { SpectrumData } from "./review-figure";

/**
 * An average's members (file, index, raw file's SHA-256; used, or left out with the test's reason and a
 * "Put back"), and "Undo average", which brings the members back; for a member, the average it is in.
 */
export function AverageMembers(props: { lab: string; data: SpectrumData; canEdit: boolean; go: (id: string) => void }) {
  const { lab, data, canEdit, go } = props;
  const qc = useQueryClient();
  const [error, setError] = useState<string | null>(null);
  const done = (next: string) => {
    setError(null);
    void qc.invalidateQueries({ queryKey: queryKeys.phase(data.sampleId) });
    // The members' own pages say which average they are in: every cached spectrum is refetched.
    for (const m of data.average?.members ?? []) void qc.invalidateQueries({ queryKey: queryKeys.spectrum(m.id) });
    go(next);
  };
  const fail = (e: unknown) => setError(e instanceof ApiError ? e.message : "Not saved.");
  const undo = useMutation({
    mutationFn: () => api<{ members: string[] }>(lab, "DELETE", `/spectra/${data.id}/average`),
    onSuccess: (r) => done(r.members[0]),
    onError: fail,
  });
  const putBack = useMutation({
    mutationFn: (memberId: string) =>
      api<{ id: string }>(lab, "POST", `/spectra/${data.id}/average/put-back`, { memberId }),
    onSuccess: (r) => done(r.id),
    onError: fail,
  });
  if (data.averagedInto)
    return (
      <p className="rounded-xl border border-line bg-card p-4 text-xs" data-testid="averaged-into">
        This repeat is in an average, which stands for it in the crossing fit:{" "}
        <Link className="underline" href={`/labs/${lab}/spectra/${data.averagedInto.id}`}>
          {data.averagedInto.label}
        </Link>
        .
      </p>
    );
  if (!data.average) return null;
  return (
    <section className="rounded-xl border border-line bg-card p-4 text-sm" aria-label="Average" data-testid="average">
      <h2 className="text-sm font-semibold">Average</h2>
      <p className="mt-1 text-xs text-ink-soft">{data.average.description}.</p>
      <ul className="mt-2 space-y-1.5 text-xs">
        {data.average.members.map((m) => (
          <li key={m.id} data-testid="average-member" data-used={m.used}>
            <Link className="underline" href={`/labs/${lab}/spectra/${m.id}`}>
              {m.sourceName} #{m.index}
            </Link>{" "}
            <span className="text-muted">{m.label}</span>{" "}
            <span className="num text-muted" title={m.rawSha256}>
              SHA-256 {m.rawSha256.slice(0, 12)}…
            </span>{" "}
            {m.used ? (
              <span className="text-ok">{m.putBack ? "used (put back by hand)" : "used"}</span>
            ) : (
              <span className="block text-copper">
                {m.leftOutReason}{" "}
                {canEdit ? (
                  <button
                    type="button"
                    className="underline"
                    disabled={putBack.isPending}
                    onClick={() => putBack.mutate(m.id)}
                  >
                    Put back
                  </button>
                ) : null}
              </span>
            )}
          </li>
        ))}
      </ul>
      {error ? <p className="mt-2 text-xs text-danger">{error}</p> : null}
      {canEdit ? (
        <Button
          type="button"
          variant="secondary"
          className="mt-3 py-1"
          disabled={undo.isPending}
          onClick={() => undo.mutate()}
          data-testid="undo-average"
        >
          Undo average
        </Button>
      ) : null}
    </section>
  );
}
