import { counted } from "@/lib/format";

/**
 * How each state of a file row is named and shown. The browser's own steps (reading, registering,
 * uploading) and the server's states (pending = still being sent, queued, processing, done,
 * failed) share labels where they mean the same to the person watching.
 */
export const STATE_LABEL: Record<
  string,
  { label: string; tone: "neutral" | "teal" | "ok" | "danger" | "copper"; icon: string }
> = {
  hashing: { label: "reading", tone: "neutral", icon: "…" },
  registering: { label: "registering", tone: "neutral", icon: "…" },
  uploading: { label: "uploading", tone: "teal", icon: "↑" },
  pending: { label: "uploading", tone: "teal", icon: "↑" },
  queued: { label: "queued", tone: "neutral", icon: "◷" },
  processing: { label: "processing", tone: "teal", icon: "⟳" },
  done: { label: "done", tone: "ok", icon: "✓" },
  failed: { label: "failed", tone: "danger", icon: "!" },
  error: { label: "failed", tone: "danger", icon: "!" },
};

/** The order rows and counts are given in: failures first, then the work in the order it happens. */
const ORDER = ["failed", "reading", "registering", "uploading", "queued", "processing", "done"];
const rank = (label: string) => (ORDER.includes(label) ? ORDER.indexOf(label) : ORDER.length);
export const labelOf = (status: string) => STATE_LABEL[status]?.label ?? status;

/** Rows in the order the panel lists them: failed files first (their messages in view), otherwise as they came. */
export function failuresFirst<T extends { status: string }>(rows: T[]): T[] {
  return [...rows].sort((a, b) => Number(labelOf(b.status) === "failed") - Number(labelOf(a.status) === "failed"));
}

/** One line for the whole list: "3 files: 1 failed, 2 done", each label once, failures first. */
export function uploadSummary(statuses: string[]): string {
  const counts = new Map<string, number>();
  for (const s of statuses) counts.set(labelOf(s), (counts.get(labelOf(s)) ?? 0) + 1);
  const parts = [...counts].sort((a, b) => rank(a[0]) - rank(b[0])).map(([label, n]) => `${n} ${label}`);
  return `${counted(statuses.length, "file")}: ${parts.join(", ")}`;
}
