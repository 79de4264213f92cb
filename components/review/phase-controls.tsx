"use client";

import { useSyncExternalStore } from "react";
import type { Theory } from "./phase-traces";
import { usePhaseOf } from "./sample-queries";

/** Whether the screen matches a media query (false on the server and while hydrating). */
export function useMedia(query: string): boolean {
  return useSyncExternalStore(
    (changed) => {
      const list = window.matchMedia(query);
      list.addEventListener("change", changed);
      return () => list.removeEventListener("change", changed);
    },
    () => window.matchMedia(query).matches,
    () => false,
  );
}

/** The theory overlay's switch and its two numbers, folded away until asked for. */
export function TheoryControls({ theory, onChange }: { theory: Theory; onChange: (t: Theory) => void }) {
  const set = (change: Partial<Theory>) => onChange({ ...theory, ...change });
  return (
    <details className="text-xs text-ink-soft">
      <summary className="cursor-pointer select-none">Theory overlay</summary>
      <div className="mt-2 flex flex-wrap items-end gap-2 rounded-md border border-line bg-white p-2">
        <label className="inline-flex items-center gap-1.5">
          <input type="checkbox" checked={theory.on} onChange={(e) => set({ on: e.target.checked })} /> Δ(E) = 2|λ
          <sub>SO</sub> − ℓeE|
        </label>
        <label>
          λ<sub>SO</sub> (meV){" "}
          <input
            className="num ml-1 w-16 rounded border border-line px-1"
            value={theory.lambda_meV}
            onChange={(e) => set({ lambda_meV: e.target.value })}
          />
        </label>
        <label>
          ℓ (Å){" "}
          <input
            className="num ml-1 w-16 rounded border border-line px-1"
            value={theory.ell_A}
            onChange={(e) => set({ ell_A: e.target.value })}
          />
        </label>
        <span className="text-muted">
          {THEORY_NOTE} → E<sub>c</sub> = λ/ℓ
        </span>
      </div>
    </details>
  );
}

const THEORY_NOTE = "buckled-honeycomb model; e.g. germanene λ ≈ 43 meV, ℓ ≈ 0.33 Å (published estimates, from memory)";

/** The card's title: what the plot under it shows, following the same query as the plot. */
export function PhasePlotTitle({
  lab,
  sampleId,
  initialHistogram,
}: {
  lab: string;
  sampleId: string;
  initialHistogram: boolean;
}) {
  const histogram = usePhaseOf(lab, sampleId, (d) => d.sharedField != null && d.points.length > 0, initialHistogram);
  return (
    <h2 className="text-sm font-semibold tracking-wide text-ink">
      {histogram ? "Gaps at one field" : "Gap versus estimated field"}
    </h2>
  );
}
