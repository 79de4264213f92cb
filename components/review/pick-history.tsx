import { formatMv as mv, formatUtc } from "@/lib/format";

export type History = {
  id: string;
  action: string;
  reason: string | null;
  at: string;
  actorName: string | null;
  before: Record<string, unknown>;
  after: Record<string, unknown>;
}[];

/** The pick's history, in the order the server gives: who, what, when, the edges a correction moved, and why. */
export function PickHistory({ history }: { history: History }) {
  if (!history.length) return null;
  return (
    <section className="rounded-xl border border-line bg-card p-4" aria-label="History">
      <h2 className="text-sm font-semibold">History</h2>
      <ol className="mt-2 space-y-2 text-xs" data-testid="pick-history">
        {history.map((h) => (
          <li key={h.id}>
            <span className="font-medium">{h.actorName ?? "someone"}</span> ·{" "}
            {h.action === "accept" ? `accepted pick v${String(h.after.version)}` : h.action} ·{" "}
            <span className="num text-muted">{formatUtc(h.at)}</span>
            {h.action === "correct" ? (
              <span className="num block text-ink-soft">
                {mv(h.before.vbEdgeV as number)}–{mv(h.before.cbEdgeV as number)} → {mv(h.after.vbEdgeV as number)}–
                {mv(h.after.cbEdgeV as number)}
              </span>
            ) : null}
            {h.reason ? <span className="block text-ink-soft">“{h.reason}”</span> : null}
          </li>
        ))}
      </ol>
    </section>
  );
}
