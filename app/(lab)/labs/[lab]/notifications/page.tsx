import { formatUtc } from "@/lib/format";
import type { Metadata } from "next";
import Link from "next/link";
import { Card, EmptyState, PageHeader } from "@/components/ui/card";
import { pageCtx } from "@/lib/actions/validated";
import { listNotifications } from "@/lib/services/alerts/listNotifications";
import { MarkAllRead, MarkRead } from "./mark-read";

export const metadata: Metadata = { title: "Alerts" };

const KIND: Record<string, { sign: string; label: string; tone: string }> = {
  found: { sign: "✕", label: "found", tone: "bg-copper-soft text-copper" },
  moved: { sign: "↔", label: "moved", tone: "bg-teal-soft text-teal" },
  confirmed: { sign: "✓", label: "confirmed", tone: "bg-ok-soft text-ok" },
};

export default async function NotificationsPage({ params }: { params: Promise<{ lab: string }> }) {
  const { lab } = await params;
  const ctx = await pageCtx(lab);
  const items = await listNotifications({ ctx, input: { limit: 200 } });
  const unread = items.filter((n) => !n.read).length;
  return (
    <>
      <PageHeader
        eyebrow="Alerts"
        title="Critical-field alerts"
        description={
          "When a sample you watch first crosses, when a later fit moves its critical field outside the earlier 95% " +
          "interval, and when an analyst confirms it. Watch or stop watching on each sample's page."
        }
        actions={unread ? <MarkAllRead lab={lab} /> : null}
      />
      {items.length === 0 ? (
        <EmptyState title="No alerts yet">Watch a sample to hear when its gap closes and reopens.</EmptyState>
      ) : (
        <Card title={`${unread} unread of ${items.length}`}>
          <ul className="divide-y divide-line" data-testid="notifications">
            {items.map((n) => {
              const k = n.kind ? KIND[n.kind] : null;
              return (
                <li
                  key={n.id}
                  className="flex items-start gap-3 py-3"
                  data-testid="notification"
                  data-read={n.read ? "true" : "false"}
                >
                  <span
                    className={
                      `mt-0.5 inline-flex shrink-0 items-center gap-1 rounded-full px-2 py-0.5 ` +
                      `text-xs font-medium ${k?.tone ?? "bg-line/60 text-ink-soft"}`
                    }
                  >
                    <span aria-hidden>{k?.sign ?? "•"}</span> {k?.label ?? "note"}
                  </span>
                  <div className="min-w-0 flex-1">
                    <p className={`text-sm ${n.read ? "text-ink-soft" : "font-semibold text-ink"}`}>
                      {n.href ? (
                        <Link href={n.href} className="hover:underline">
                          {n.title}
                        </Link>
                      ) : (
                        n.title
                      )}
                      {n.read ? null : <span className="sr-only"> (unread)</span>}
                    </p>
                    <p className="mt-0.5 text-xs text-muted">
                      {n.body} · <time dateTime={n.createdAt}>{formatUtc(n.createdAt)}</time>
                    </p>
                  </div>
                  {n.read ? null : <MarkRead lab={lab} id={n.id} />}
                </li>
              );
            })}
          </ul>
        </Card>
      )}
    </>
  );
}
