"use client";

import Link from "next/link";
import { usePathname } from "next/navigation";
import { useEffect, useState } from "react";
import { BrandMark } from "@/components/brand";
import { loadPlotly } from "@/components/plots/plotly-script";
import type { MemberRole } from "@/db/schema/auth";

const ROLE_LABEL: Record<MemberRole, string> = {
  owner: "Owner",
  microscopist: "Microscopist",
  analyst: "Analyst",
  collaborator: "Collaborator",
};

/** A navigation link: the current page's, and the others'. */
const NAV_LINK = "flex items-center gap-2 rounded-md px-3 py-2 text-sm";
const NAV_ACTIVE = "bg-white/10 font-medium text-white";
const NAV_IDLE = "text-white/70 hover:bg-white/5 hover:text-white";
const NAV_CURRENT_LAB = "font-medium text-white";

export function LabNav({
  lab,
  user,
  labs,
  canConfigure,
  signOut,
  unreadCount = 0,
}: {
  lab: { slug: string; name: string };
  user: { name: string; email: string; role: MemberRole };
  /** Every lab of the person, this one included (the switcher lists them all). */
  labs: { slug: string; name: string }[];
  canConfigure: boolean;
  signOut: () => Promise<void>;
  /** Crossing alerts: unread notifications of this person in this lab, shown as a badge on "Alerts". */
  unreadCount?: number;
}) {
  const path = usePathname();
  // Most visits lead to a plot: fetch and compile the plotting library while the browser is idle,
  // so the first phase plot or spectrum of a visit does not wait for it.
  useEffect(() => {
    const load = () => void loadPlotly().catch(() => {}); // a page that plots reports its own failure
    if ("requestIdleCallback" in window) {
      const id = window.requestIdleCallback(load, { timeout: 3000 });
      return () => window.cancelIdleCallback(id);
    }
    const t = setTimeout(load, 1500);
    return () => clearTimeout(t);
  }, []);
  const [open, setOpen] = useState(false);
  const base = `/labs/${lab.slug}`;
  const items = [
    { href: base, label: "Samples", exact: true },
    { href: `${base}/sessions`, label: "Sessions" },
    { href: `${base}/compare`, label: "Compare" },
    { href: `${base}/tips`, label: "Tips" },
    // Crossing alerts (notifications page); the badge is rendered below.
    { href: `${base}/notifications`, label: "Alerts", badge: unreadCount },
    ...(canConfigure ? [{ href: `${base}/settings`, label: "Lab settings" }] : []),
  ];
  const isActive = (href: string, exact?: boolean) =>
    exact ? path === href || path.startsWith(`${base}/samples`) : path.startsWith(href);
  return (
    <aside className="border-b border-white/10 bg-night text-white lg:sticky lg:top-0 lg:h-screen lg:border-b-0">
      <a
        href="#main"
        className={
          "sr-only focus:not-sr-only focus:absolute focus:left-2 focus:top-2 focus:z-10 " +
          "focus:rounded focus:bg-white focus:px-3 focus:py-2 focus:text-ink"
        }
      >
        Skip to content
      </a>
      <div className="flex items-center justify-between px-5 py-4 lg:block lg:py-6">
        <Link href={base} aria-label="Bandcross home">
          <BrandMark inverted />
        </Link>
        <button
          type="button"
          className="rounded-md border border-white/20 px-3 py-1.5 text-sm lg:hidden"
          aria-expanded={open}
          aria-controls="lab-nav"
          onClick={() => setOpen((v) => !v)}
        >
          Menu
        </button>
      </div>
      <div
        id="lab-nav"
        className={
          `${open ? "block" : "hidden"} px-3 pb-6 lg:flex ` + `lg:h-[calc(100vh-88px)] lg:flex-col lg:justify-between`
        }
      >
        <div>
          <div className="mx-2 mb-5 rounded-lg bg-white/5 px-3 py-2.5">
            <p className="text-[11px] uppercase tracking-[0.14em] text-white/50">Lab</p>
            <p className="truncate text-sm font-medium" title={lab.name}>
              {lab.name}
            </p>
            <details className="mt-1 text-xs text-white/70" data-testid="lab-switcher">
              <summary className="cursor-pointer">{labs.length > 1 ? "Switch lab" : "Labs"}</summary>
              <ul className="mt-1.5 space-y-1">
                {labs.map((l) => (
                  <li key={l.slug}>
                    <Link
                      className={`block truncate ${l.slug === lab.slug ? NAV_CURRENT_LAB : "hover:text-white"}`}
                      href={`/labs/${l.slug}`}
                      aria-current={l.slug === lab.slug ? "page" : undefined}
                      title={l.name}
                    >
                      {l.slug === lab.slug ? "✓ " : ""}
                      {l.name}
                    </Link>
                  </li>
                ))}
                <li className="border-t border-white/10 pt-1.5">
                  <Link className="text-copper-soft hover:text-white" href={`${base}/new-lab`}>
                    + New lab
                  </Link>
                </li>
              </ul>
            </details>
          </div>
          <nav aria-label="Lab">
            <ul className="space-y-0.5">
              {items.map((item) => {
                const active = isActive(item.href, item.exact);
                return (
                  <li key={item.href}>
                    <Link
                      href={item.href}
                      aria-current={active ? "page" : undefined}
                      className={`${NAV_LINK} ${active ? NAV_ACTIVE : NAV_IDLE}`}
                    >
                      <span
                        className={`h-4 w-0.5 rounded-full ${active ? "bg-copper" : "bg-transparent"}`}
                        aria-hidden
                      />
                      {item.label}
                      {/* Crossing alerts: unread count */}
                      {"badge" in item && item.badge ? (
                        <span
                          className={
                            "ml-auto rounded-full bg-copper px-1.5 py-0.5 text-[11px] " +
                            "font-semibold leading-none text-white"
                          }
                          data-testid="unread-count"
                          aria-label={`${item.badge} unread`}
                        >
                          {item.badge > 99 ? "99+" : item.badge}
                        </span>
                      ) : null}
                    </Link>
                  </li>
                );
              })}
            </ul>
          </nav>
        </div>
        <div className="mx-2 mt-6 border-t border-white/10 pt-4">
          <p className="truncate text-sm font-medium">{user.name}</p>
          <p className="truncate text-xs text-white/60">{user.email}</p>
          <p className="mt-1 text-xs text-white/60" data-testid="current-role">
            {ROLE_LABEL[user.role]}
          </p>
          <form action={signOut} className="mt-3">
            <button type="submit" className="text-xs text-white/70 underline-offset-2 hover:text-white hover:underline">
              Sign out
            </button>
          </form>
        </div>
      </div>
    </aside>
  );
}
