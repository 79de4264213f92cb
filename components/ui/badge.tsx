import type { ReactNode } from "react";

const TONES = {
  neutral: "bg-line/60 text-ink-soft",
  copper: "bg-copper-soft text-copper",
  teal: "bg-teal-soft text-teal",
  ok: "bg-ok-soft text-ok",
  danger: "bg-danger-soft text-danger",
  ink: "bg-ink text-white",
} as const;

export function Badge({
  tone = "neutral",
  children,
  title,
}: {
  tone?: keyof typeof TONES;
  children: ReactNode;
  title?: string;
}) {
  return (
    <span
      title={title}
      className={`inline-flex items-center gap-1 rounded-full px-2 py-0.5 text-xs font-medium ${TONES[tone]}`}
    >
      {children}
    </span>
  );
}

/** Crossing states, each with a shape as well as a colour so they read without colour. */
export function CrossingBadge({
  state,
  status,
}: {
  state: "crossed" | "closing" | "none" | null;
  status?: string | null;
}) {
  if (!state) return <span className="text-xs text-muted">no fit yet</span>;
  if (state === "crossed")
    return (
      <Badge tone="copper" title="The gap closes and reopens within the measured fields">
        <span aria-hidden>✕</span> crossed{status === "confirmed" ? " · confirmed" : ""}
      </Badge>
    );
  if (state === "closing")
    return (
      <Badge tone="teal" title="The gap shrinks with field but has not reopened">
        <span aria-hidden>↘</span> closing
      </Badge>
    );
  return (
    <Badge tone="neutral" title="No field dependence that a fit can support">
      <span aria-hidden>–</span> none
    </Badge>
  );
}
