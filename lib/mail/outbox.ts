import "server-only";
import fs from "node:fs/promises";
import path from "node:path";

/**
 * Development pages (the mail outbox viewer) exist only outside production, or when
 * BANDCROSS_DEV_PAGES=1 asks for them on a production build (`npm start` serves one; the test
 * stack sets the flag for its browser tests). Anywhere else they answer 404.
 */
export function devPagesEnabled(e: { NODE_ENV?: string; BANDCROSS_DEV_PAGES?: string } = process.env): boolean {
  return e.NODE_ENV !== "production" || e.BANDCROSS_DEV_PAGES === "1";
}

export interface OutboxMessage {
  id: string;
  from: string;
  to: string[];
  subject: string;
  html: string | null;
  text: string | null;
  created_at: string;
}

/** The mail fake's outbox (storage-fake/mail.mjs keeps one JSON file per message), newest first. */
export async function readOutbox(dir: string, limit = 200): Promise<OutboxMessage[]> {
  let names: string[];
  try {
    names = (await fs.readdir(dir)).filter((n) => n.endsWith(".json") && !n.startsWith("."));
  } catch {
    return [];
  }
  names.sort().reverse();
  const out: OutboxMessage[] = [];
  for (const name of names.slice(0, limit)) {
    try {
      const m = JSON.parse(await fs.readFile(path.join(dir, name), "utf8"));
      if (m && typeof m.id === "string") out.push({ id: m.id, from: m.from, to: Array.isArray(m.to) ? m.to : [m.to], subject: m.subject, html: m.html ?? null, text: m.text ?? null, created_at: m.created_at });
    } catch {
      // a file being written is skipped
    }
  }
  return out;
}
