/**
 * bandcross push DIR --session ID [--url URL] [--json] [--timeout S]
 * For the acquisition PC: uploads every spectrum file in DIR through the HTTP API (token in
 * BANDCROSS_TOKEN), straight to storage with presigned PUTs, waits for processing and prints a
 * summary. Exit status 1 when any file failed.
 */
import { createHash } from "node:crypto";
import fs from "node:fs";
import path from "node:path";
import pLimit from "p-limit";
import type { Command, Io } from "../io";
import { CliUsageError } from "../io";
import { parse, table } from "../shared";

const usage = `usage: bandcross push DIR --session ID [--url URL] [--json] [--timeout SECONDS]
  DIR             a folder of spectrum files (csv, tsv, txt, dat, json, zip), read recursively
  --session ID    the session the spectra belong to (its id is on the session's page)
  --url URL       the Bandcross server (default $BANDCROSS_URL or http://localhost:3000)
  --timeout S     how long to wait for processing (default 600)
  --json          print the summary as JSON
The API token is read from BANDCROSS_TOKEN (create one in Lab settings, or with bandcross token create).
exit status: 0 when every file was processed, 1 when any failed, 2 for a usage error`;

const SPECTRUM_FILE = /\.(csv|tsv|txt|dat|json|zip)$/i;
const PUT_CONCURRENCY = 6;

export function listSpectrumFiles(dir: string): string[] {
  const out: string[] = [];
  const walk = (d: string) => {
    for (const e of fs.readdirSync(d, { withFileTypes: true }).sort((a, b) => a.name.localeCompare(b.name))) {
      if (e.name.startsWith(".")) continue;
      const p = path.join(d, e.name);
      if (e.isDirectory()) walk(p);
      else if (e.isFile() && SPECTRUM_FILE.test(e.name)) out.push(p);
    }
  };
  walk(dir);
  return out;
}

interface Ticket {
  id: string;
  name: string;
  status: string;
  duplicate: boolean;
  url: string | null;
  headers: Record<string, string>;
  expiresInSeconds?: number | null;
}
interface Result {
  file: string;
  uploadId: string | null;
  status: string;
  spectra: number;
  duplicate: boolean;
  message: string | null;
}

class Api {
  constructor(
    private readonly base: string,
    private readonly token: string,
  ) {}
  async call<T>(method: string, p: string, body?: unknown): Promise<T> {
    let res: Response;
    try {
      res = await fetch(`${this.base}/api/v1${p}`, {
        method,
        headers: { authorization: `Bearer ${this.token}`, ...(body ? { "content-type": "application/json" } : {}) },
        body: body ? JSON.stringify(body) : undefined,
      });
    } catch (e) {
      throw new Error(`cannot reach ${this.base} (${(e as Error & { cause?: Error }).cause?.message ?? (e as Error).message})`);
    }
    const text = await res.text();
    const json = text ? JSON.parse(text) : {};
    if (!res.ok) throw new Error(json?.error?.message ? `${json.error.message} (HTTP ${res.status})` : `HTTP ${res.status}`);
    return json as T;
  }
}

function progress(io: Io, tty: boolean) {
  let last = "";
  return {
    show(label: string, done: number, total: number) {
      const width = 28;
      const filled = total ? Math.round((done / total) * width) : width;
      const line = `${label.padEnd(11)} [${"#".repeat(filled)}${".".repeat(width - filled)}] ${done}/${total}`;
      if (tty) io.err(`\r${line}`);
      else if (line !== last && (done === total || done % Math.max(1, Math.ceil(total / 10)) === 0)) io.err(`${line}\n`);
      last = line;
    },
    end() {
      if (tty) io.err("\n");
    },
  };
}

async function pool<T>(items: T[], n: number, fn: (item: T) => Promise<void>) {
  const limit = pLimit(n);
  await Promise.all(items.map((item) => limit(() => fn(item))));
}

export const push: Command = {
  name: "push",
  summary: "upload a folder of spectra to a session through the API",
  usage,
  async run(argv, io) {
    const { values, positionals } = parse(argv, { session: { type: "string" }, url: { type: "string" }, json: { type: "boolean" }, timeout: { type: "string" }, help: { type: "boolean", short: "h" } });
    if (values.help) {
      io.out(usage + "\n");
      return 0;
    }
    const [dir] = positionals;
    if (!dir) throw new CliUsageError("name the folder to push");
    if (!values.session) throw new CliUsageError("--session is required");
    const token = process.env.BANDCROSS_TOKEN;
    if (!token) throw new CliUsageError("set BANDCROSS_TOKEN to an API token of your lab");
    if (!fs.existsSync(dir) || !fs.statSync(dir).isDirectory()) throw new CliUsageError(`${dir} is not a folder`);
    const base = String(values.url ?? process.env.BANDCROSS_URL ?? "http://localhost:3000").replace(/\/+$/, "");
    const timeoutMs = Number(values.timeout ?? 600) * 1000;
    const api = new Api(base, token);
    const tty = Boolean(process.stderr.isTTY);
    const files = listSpectrumFiles(dir);
    if (files.length === 0) {
      io.err(`bandcross push: no spectrum files in ${dir}\n`);
      return 1;
    }

    const local = files.map((f) => {
      const bytes = fs.readFileSync(f);
      return { path: f, name: path.relative(dir, f).split(path.sep).join("_"), bytes, sha256: createHash("sha256").update(bytes).digest("hex") };
    });
    const results = new Map<string, Result>();
    const tickets: { local: (typeof local)[number]; t: Ticket; at: number }[] = [];
    const register = (batch: typeof local) =>
      api.call<{ uploads: Ticket[] }>("POST", "/uploads", {
        sessionId: values.session,
        files: batch.map((f) => ({ name: f.name, size: f.bytes.length, sha256: f.sha256 })),
      });
    for (let i = 0; i < local.length; i += 200) {
      const batch = local.slice(i, i + 200);
      const at = Date.now();
      const { uploads } = await register(batch);
      uploads.forEach((t, j) => tickets.push({ local: batch[j], t, at }));
    }
    // Upload URLs live a few minutes: a file whose URL is near its end asks for a fresh one first.
    const fresh = async (x: (typeof tickets)[number]): Promise<Ticket> => {
      const life = (x.t.expiresInSeconds ?? Infinity) * 1000;
      if (Date.now() - x.at < life - 60_000) return x.t;
      const { uploads } = await register([x.local]);
      return uploads[0];
    };

    const bar = progress(io, tty);
    let sent = 0;
    const toSend = tickets.filter((x) => !x.t.duplicate);
    bar.show("uploading", 0, toSend.length);
    await pool(toSend, PUT_CONCURRENCY, async (x) => {
      const { local: f, t } = x;
      try {
        const now = await fresh(x);
        if (now.duplicate || !now.url) return void bar.show("uploading", ++sent, toSend.length);
        const res = await fetch(now.url, { method: "PUT", headers: now.headers, body: f.bytes });
        if (!res.ok) throw new Error(`storage answered HTTP ${res.status}`);
        await api.call("POST", `/uploads/${t.id}/complete`);
      } catch (e) {
        results.set(t.id, { file: f.name, uploadId: t.id, status: "failed", spectra: 0, duplicate: false, message: `upload failed: ${(e as Error).message}` });
      }
      bar.show("uploading", ++sent, toSend.length);
    });
    bar.end();

    const deadline = Date.now() + timeoutMs;
    const pending = new Set(tickets.filter((x) => !results.has(x.t.id)).map((x) => x.t.id));
    const byId = new Map(tickets.map((x) => [x.t.id, x]));
    const total = pending.size;
    bar.show("processing", 0, total);
    while (pending.size && Date.now() < deadline) {
      for (const id of [...pending]) {
        const u = await api.call<{ status: string; message: string | null; spectraCount: number }>("GET", `/uploads/${id}`);
        if (u.status === "done" || u.status === "failed") {
          pending.delete(id);
          const x = byId.get(id)!;
          results.set(id, { file: x.local.name, uploadId: id, status: u.status, spectra: u.spectraCount, duplicate: x.t.duplicate, message: u.message });
        }
      }
      bar.show("processing", total - pending.size, total);
      if (pending.size) await new Promise((r) => setTimeout(r, 400));
    }
    bar.end();
    for (const id of pending) {
      const x = byId.get(id)!;
      results.set(id, { file: x.local.name, uploadId: id, status: "timeout", spectra: 0, duplicate: x.t.duplicate, message: `still processing after ${timeoutMs / 1000} s; check it in the browser` });
    }

    const all = tickets.map((x) => results.get(x.t.id)!);
    const failed = all.filter((r) => r.status !== "done");
    if (values.json) {
      io.out(JSON.stringify({ files: all, ok: all.length - failed.length, failed: failed.length }, null, 2) + "\n");
    } else {
      const rows = [["file", "status", "spectra", "note"]];
      for (const r of all) rows.push([r.file, r.duplicate ? `${r.status} (already uploaded)` : r.status, String(r.spectra), r.message ?? ""]);
      io.out(table(rows));
      io.out(`${all.length - failed.length} ok, ${failed.length} failed\n`);
    }
    return failed.length ? 1 : 0;
  },
};
