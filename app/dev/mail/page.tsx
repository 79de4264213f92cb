import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { connection } from "next/server";
import { env } from "@/lib/env";
import { devPagesEnabled, readOutbox } from "@/lib/mail/outbox";

export const metadata: Metadata = { title: "Mail outbox (development)", robots: { index: false } };

/**
 * Development only: every message the local mail fake accepted (files under MAIL_OUTBOX_DIR),
 * newest first, with the selected one rendered as its recipient would see it. 404 in production
 * unless BANDCROSS_DEV_PAGES=1.
 */
export default async function DevMailPage({ searchParams }: { searchParams: Promise<{ id?: string; to?: string }> }) {
  await connection();
  if (!devPagesEnabled()) notFound();
  const { id, to } = await searchParams;
  const dir = env().MAIL_OUTBOX_DIR;
  const all = dir ? await readOutbox(dir) : [];
  const list = to ? all.filter((m) => m.to.some((a) => a.toLowerCase().includes(to.toLowerCase()))) : all;
  const selected = list.find((m) => m.id === id) ?? list[0];
  const href = (m: { id: string }) => `/dev/mail?id=${m.id}${to ? `&to=${encodeURIComponent(to)}` : ""}`;
  return (
    <div className="min-h-screen bg-paper px-5 py-6">
      <header className="mb-4 flex flex-wrap items-end justify-between gap-3">
        <div>
          <p className="text-xs font-semibold uppercase tracking-[0.14em] text-copper">Development</p>
          <h1 className="text-2xl font-semibold">Mail outbox</h1>
          <p className="text-sm text-ink-soft">
            {all.length} message{all.length === 1 ? "" : "s"} in{" "}
            <span className="num">{dir ?? "(MAIL_OUTBOX_DIR is not set)"}</span>
          </p>
        </div>
        <form className="flex gap-2" action="/dev/mail">
          <input
            name="to"
            defaultValue={to ?? ""}
            placeholder="Filter by recipient"
            className="rounded-md border border-line bg-card px-3 py-1.5 text-sm"
          />
          <button className="rounded-md bg-ink px-3 py-1.5 text-sm text-white">Filter</button>
        </form>
      </header>
      {list.length === 0 ? (
        <p className="text-sm text-ink-soft">No messages{to ? ` to “${to}”` : ""}.</p>
      ) : (
        <div className="grid gap-4 lg:grid-cols-[380px_1fr]">
          <ul
            className="max-h-[80vh] divide-y divide-line overflow-auto rounded-xl border border-line bg-card"
            data-testid="outbox-list"
          >
            {list.map((m) => (
              <li key={m.id}>
                <Link
                  href={href(m)}
                  className={
                    `block px-4 py-2.5 text-sm hover:bg-paper ` + `${m.id === selected?.id ? "bg-copper-soft" : ""}`
                  }
                  aria-current={m.id === selected?.id ? "true" : undefined}
                >
                  <span className="block truncate font-medium">{m.subject}</span>
                  <span className="block truncate text-xs text-muted">
                    {m.to.join(", ")} · {m.created_at?.slice(0, 19).replace("T", " ")}
                  </span>
                </Link>
              </li>
            ))}
          </ul>
          {selected ? (
            <article className="rounded-xl border border-line bg-card" data-testid="outbox-message">
              <dl className="grid grid-cols-[80px_1fr] gap-x-3 gap-y-1 border-b border-line px-5 py-3 text-sm">
                <dt className="text-muted">Subject</dt>
                <dd className="font-medium">{selected.subject}</dd>
                <dt className="text-muted">To</dt>
                <dd className="num">{selected.to.join(", ")}</dd>
                <dt className="text-muted">From</dt>
                <dd className="num">{selected.from}</dd>
              </dl>
              {selected.html ? (
                <iframe title="HTML body" sandbox="" srcDoc={selected.html} className="h-[640px] w-full border-0" />
              ) : null}
              {selected.text ? (
                <details className="border-t border-line px-5 py-3" open={!selected.html}>
                  <summary className="cursor-pointer text-sm text-ink-soft">Text body</summary>
                  <pre className="mt-2 whitespace-pre-wrap text-xs">{selected.text}</pre>
                </details>
              ) : null}
            </article>
          ) : null}
        </div>
      )}
    </div>
  );
}
