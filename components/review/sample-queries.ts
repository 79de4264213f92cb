"use client";

import { useQuery, useQueryClient } from "@tanstack/react-query";
import { useEffect } from "react";
import { api } from "@/lib/api-client";
import { queryKeys } from "@/lib/query-keys";
import type { PhaseData } from "./phase-figure";

/**
 * The sample page's shared data. Every card and action reads one of these two queries, both in
 * the sample's key family (`queryKeys.sample`): the phase data (points and the current crossing)
 * and the versions with the latest re-analysis run. When a run this page saw in progress ends,
 * the family is invalidated once, so the critical field, the plot, the field model card, the
 * alerts and Confirm all move to the new fit together, without a reload.
 */

export type SampleVersions = {
  settings: { id: string; version: number; settings: Record<string, any>; createdAt: string };
  fieldModel: { id: string; version: number; model: Record<string, any>; createdAt: string };
  run: { id: string; status: string; total: number; done: number; reason: string; message?: string | null } | null;
  /** Sessions and tips of the sample with fitted I(z) curves, for the field model's κ. */
  curveChoices?: { scope: "session" | "tip"; id: string; label: string; curves: number; kappa_per_nm: number; kappaSigma_per_nm: number }[];
  /** The fitted curves one by one, for a set chosen by hand. */
  fittedCurves?: { id: string; label: string; kappa_per_nm: number; kappaSigma_per_nm: number; flags: string[] }[];
};

/** Run states with work still to come. */
export const RUN_ACTIVE = new Set(["queued", "running", "fitting"]);

/** Runs this page has seen in progress; one leaving the set is the one invalidation of its end. */
const runsInProgress = new Set<string>();

/** Marks a run as in progress as soon as a save has started it (before the first poll sees it). */
export function followRun(runId: string | undefined) {
  if (runId) runsInProgress.add(runId);
}

/** The sample's versions and re-analysis progress, polled while a run is active; its end refreshes the family. */
export function useSampleVersions(lab: string, sampleId: string, initial: SampleVersions): SampleVersions {
  const qc = useQueryClient();
  const { data = initial } = useQuery({
    queryKey: queryKeys.sampleVersions(sampleId),
    queryFn: () => api<SampleVersions>(lab, "GET", `/samples/${sampleId}/analysis`),
    initialData: initial,
    refetchInterval: (q) => (q.state.data?.run && RUN_ACTIVE.has(q.state.data.run.status) ? 500 : false),
  });
  const run = data.run;
  useEffect(() => {
    if (!run) return;
    if (RUN_ACTIVE.has(run.status)) runsInProgress.add(run.id);
    // Shared by every card that calls this hook: only the first to see the end invalidates.
    else if (runsInProgress.delete(run.id))
      void qc.invalidateQueries({
        queryKey: queryKeys.sample(sampleId),
        predicate: (q) => q.queryKey[2] !== "versions",
      });
  }, [run, qc, sampleId]);
  return data;
}

const fetchPhase = (lab: string, sampleId: string) => () => api<PhaseData>(lab, "GET", `/samples/${sampleId}/phase`);

/** The phase data, as the plot holds it (initial data from the page, refreshed every 10 s and when a job ends). */
export function usePhase(lab: string, sampleId: string, initial: PhaseData) {
  return useQuery({
    queryKey: queryKeys.phase(sampleId),
    queryFn: fetchPhase(lab, sampleId),
    initialData: initial,
    refetchInterval: 10_000,
  });
}

/**
 * The same phase query for cards beside the plot: they read what the plot's query holds and never
 * fetch on their own (the plot, hydrated first, owns the fetching), with the page's value until then.
 */
export function usePhaseOf<T>(lab: string, sampleId: string, pick: (d: PhaseData) => T, fallback: T): T {
  const { data } = useQuery({
    queryKey: queryKeys.phase(sampleId),
    queryFn: fetchPhase(lab, sampleId),
    enabled: false,
  });
  return data ? pick(data) : fallback;
}
