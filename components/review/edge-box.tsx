"use client";

import { useState } from "react";
import { readNumber } from "@/lib/schemas/number";

/** A bias in V as whole mV. */
const mV0 = (v: number) => (v * 1000).toFixed(0);

/**
 * Why a typed band edge (mV) cannot be used, in words, or null when it can: it must be a number
 * (read as every input reads numbers, a decimal comma too), inside the spectrum's bias range, and
 * on its side of the other edge.
 */

export function edgeProblem(
  text: string,
  o: { range: [number, number]; below?: number | null; above?: number | null },
): { value: number } | { problem: string } {
  const n = readNumber(text);
  if (n === undefined) return { problem: "Type the edge in mV." };
  if (typeof n !== "number" || !Number.isFinite(n)) return { problem: `"${text.trim()}" is not a number (mV).` };
  const v = n / 1000;
  const [lo, hi] = o.range;
  if (v < lo || v > hi)
    return {
      problem: `${n} mV is outside this spectrum's bias range (${mV0(lo)} to ${mV0(hi)} mV).`,
    };
  if (o.below != null && v >= o.below)
    return { problem: `The valence edge must lie below the conduction edge (${(o.below * 1000).toFixed(1)} mV).` };
  if (o.above != null && v <= o.above)
    return { problem: `The conduction edge must lie above the valence edge (${(o.above * 1000).toFixed(1)} mV).` };
  return { value: v };
}

/**
 * A band edge typed in mV. What is typed stays as typed (free text) until it is committed with
 * Enter or by leaving the box; only then is it read, and a value that cannot be used is refused
 * in words under the box while the edge keeps its value, so the plot never gets NaN. Escape
 * puts the edge's value back.
 */
export function EdgeBox({
  label,
  edge,
  value,
  range,
  below,
  above,
  onCommit,
}: {
  label: string;
  edge: "vb" | "cb";
  value: number | null;
  range: [number, number];
  below?: number | null;
  above?: number | null;
  onCommit: (v: number) => void;
}) {
  const [text, setText] = useState<string | null>(null);
  const [problem, setProblem] = useState<string | null>(null);
  const commit = () => {
    if (text === null) return;
    const r = edgeProblem(text, { range, below, above });
    if ("problem" in r) return setProblem(r.problem);
    setProblem(null);
    setText(null);
    onCommit(r.value);
  };
  return (
    <label className="text-xs text-muted">
      {label} (mV)
      <input
        className={
          `num mt-0.5 w-full rounded border px-2 py-1 text-sm text-ink ` +
          `${problem ? "border-danger" : "border-line"}`
        }
        aria-label={`${label[0].toUpperCase()}${label.slice(1)}-band edge in mV`}
        aria-invalid={problem ? true : undefined}
        inputMode="decimal"
        value={text ?? (value != null ? (value * 1000).toFixed(1) : "")}
        onChange={(e) => setText(e.target.value)}
        onKeyDown={(e) => {
          if (e.key === "Enter") commit();
          else if (e.key === "Escape") {
            setText(null);
            setProblem(null);
          }
        }}
        onBlur={commit}
        data-testid={`${edge}-input`}
      />
      {problem ? (
        <span role="alert" className="mt-0.5 block text-danger" data-testid={`${edge}-error`}>
          {problem}
        </span>
      ) : null}
    </label>
  );
}
