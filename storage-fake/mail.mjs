// Local stand-in for the e-mail API used by the `resend` SDK.
//
// Implements just what the product calls, in the same shapes:
//   POST /emails          body: { from, to, subject, html, text, reply_to, cc, bcc, tags, headers, ... }
//                         header Idempotency-Key (optional): same key -> same id, stored once
//                         -> 200 { id }
//   POST /emails/batch    body: [ {...}, ... ]          -> 200 { data: [ { id }, ... ] }
//   GET  /emails          ?limit=N&to=addr              -> 200 { object: "list", has_more, data: [...] } newest first
//   GET  /emails/:id                                     -> 200 { object: "email", id, ... } or 404
//   DELETE /emails        (fake only) empties the outbox -> 200 { deleted: N }
//   GET  /health                                         -> 200 { ok: true }
// Errors use the service's shape: { statusCode, name, message }.
// Every accepted message is kept as <outbox>/<timestamp>-<id>.json.
//
// Run:  node storage-fake/mail.mjs --port 9020 --host 127.0.0.1 --dir .data/mail
// (or MAIL_FAKE_PORT / MAIL_FAKE_HOST / MAIL_OUTBOX_DIR). Import `startMailFake` for in-process use.

import { randomUUID } from "node:crypto";
import fs from "node:fs";
import http from "node:http";
import path from "node:path";
import { pathToFileURL } from "node:url";

const MAX_BODY_BYTES = 10 * 1024 * 1024;

function sendJson(res, status, body) {
  const text = JSON.stringify(body);
  res.writeHead(status, {
    "content-type": "application/json; charset=utf-8",
    "content-length": Buffer.byteLength(text),
  });
  res.end(text);
}

function sendError(res, statusCode, name, message) {
  sendJson(res, statusCode, { statusCode, name, message });
}

function readBody(req) {
  return new Promise((resolve, reject) => {
    const chunks = [];
    let size = 0;
    req.on("data", (chunk) => {
      size += chunk.length;
      if (size > MAX_BODY_BYTES) {
        reject(Object.assign(new Error("body too large"), { code: "TOO_LARGE" }));
        req.destroy();
        return;
      }
      chunks.push(chunk);
    });
    req.on("end", () => resolve(Buffer.concat(chunks).toString("utf8")));
    req.on("error", reject);
  });
}

const asList = (v) => (v === undefined || v === null ? [] : Array.isArray(v) ? v : [v]);

/** Returns an error message for a bad message body, or null when it is acceptable. */
export function validateEmail(body) {
  if (!body || typeof body !== "object" || Array.isArray(body)) return "The request body must be a JSON object.";
  if (typeof body.from !== "string" || body.from.trim() === "") return "The `from` field is missing.";
  const to = asList(body.to);
  if (to.length === 0) return "The `to` field is missing.";
  if (to.length > 50) return "The `to` field must have at most 50 addresses.";
  for (const addr of [...to, ...asList(body.cc), ...asList(body.bcc), ...asList(body.reply_to)]) {
    if (typeof addr !== "string" || !/^[^\s@<>]+@[^\s@<>]+$|<[^\s@<>]+@[^\s@<>]+>\s*$/.test(addr.trim())) {
      return `Invalid address: ${JSON.stringify(addr)}.`;
    }
  }
  if (typeof body.subject !== "string" || body.subject === "") return "The `subject` field is missing.";
  const hasContent =
    (typeof body.html === "string" && body.html !== "") ||
    (typeof body.text === "string" && body.text !== "") ||
    (body.template && typeof body.template === "object");
  if (!hasContent) return "Either `html` or `text` must be provided.";
  if (body.tags !== undefined) {
    if (!Array.isArray(body.tags)) return "The `tags` field must be an array.";
    for (const t of body.tags) {
      if (!t || typeof t.name !== "string" || typeof t.value !== "string") {
        return "Each tag must have a string `name` and `value`.";
      }
    }
  }
  if (body.headers !== undefined && (typeof body.headers !== "object" || Array.isArray(body.headers))) {
    return "The `headers` field must be an object.";
  }
  return null;
}

function toRecord(id, body, createdAt) {
  const clean = Object.fromEntries(Object.entries(body).filter(([, v]) => v !== undefined));
  return {
    object: "email",
    id,
    from: clean.from,
    to: asList(clean.to),
    cc: asList(clean.cc),
    bcc: asList(clean.bcc),
    reply_to: asList(clean.reply_to),
    subject: clean.subject,
    html: clean.html ?? null,
    text: clean.text ?? null,
    tags: clean.tags ?? [],
    headers: clean.headers ?? {},
    attachments: (clean.attachments ?? []).map((a) => ({ filename: a.filename, content_type: a.content_type ?? null })),
    scheduled_at: clean.scheduled_at ?? null,
    created_at: createdAt,
    last_event: "delivered",
  };
}

/**
 * Start the mail fake. Resolves to { server, port, url, outboxDir, close() }.
 * port 0 picks a free port.
 */
export async function startMailFake({ port = 9020, host = "127.0.0.1", outboxDir, quiet = false } = {}) {
  if (!outboxDir) throw new Error("outboxDir is required");
  fs.mkdirSync(outboxDir, { recursive: true });
  const log = quiet ? () => {} : (...a) => console.log(new Date().toISOString(), ...a);

  /** @type {Map<string, object>} id -> record, insertion order = oldest first */
  const messages = new Map();
  /** @type {Map<string, {id: string, fingerprint: string}>} */
  const idempotency = new Map();
  const idemFile = path.join(outboxDir, ".idempotency.json");

  // Reload what is already in the outbox so ids survive a restart.
  for (const name of fs.readdirSync(outboxDir).sort()) {
    if (!name.endsWith(".json") || name.startsWith(".")) continue;
    try {
      const rec = JSON.parse(fs.readFileSync(path.join(outboxDir, name), "utf8"));
      if (rec && typeof rec.id === "string") messages.set(rec.id, rec);
    } catch {
      // a half-written file is ignored
    }
  }
  try {
    for (const [k, v] of Object.entries(JSON.parse(fs.readFileSync(idemFile, "utf8")))) idempotency.set(k, v);
  } catch {
    // no idempotency keys yet
  }

  const persistIdempotency = () => {
    fs.writeFileSync(idemFile, JSON.stringify(Object.fromEntries(idempotency)));
  };

  const store = (body) => {
    const id = randomUUID();
    const createdAt = new Date().toISOString();
    const record = toRecord(id, body, createdAt);
    const stamp = createdAt.replace(/[:.]/g, "-");
    const file = path.join(outboxDir, `${stamp}-${id}.json`);
    fs.writeFileSync(`${file}.tmp`, JSON.stringify(record, null, 2));
    fs.renameSync(`${file}.tmp`, file);
    messages.set(id, record);
    log(`mail to=${record.to.join(",")} subject=${JSON.stringify(record.subject)} id=${id}`);
    return id;
  };

  const handler = async (req, res) => {
    const url = new URL(req.url ?? "/", "http://localhost");
    const parts = url.pathname.split("/").filter(Boolean);

    if (req.method === "GET" && url.pathname === "/health") return sendJson(res, 200, { ok: true });

    // Sending needs an API key, as with the real service. Reading the outbox (GET) does not, so tests
    // and a person with curl can look at it directly.
    const auth = req.headers.authorization;
    if (req.method !== "GET" && (!auth || !/^Bearer\s+\S+/.test(auth))) {
      return sendError(res, 401, "missing_api_key", "Missing API key in the authorization header.");
    }

    if (parts[0] !== "emails") return sendError(res, 404, "not_found", "The requested endpoint does not exist.");

    if (req.method === "POST" && parts.length <= 2 && (parts.length === 1 || parts[1] === "batch")) {
      let raw;
      try {
        raw = await readBody(req);
      } catch (e) {
        return sendError(res, 413, "validation_error", "The request body is too large.");
      }
      let body;
      try {
        body = JSON.parse(raw);
      } catch {
        return sendError(res, 422, "validation_error", "The request body is not valid JSON.");
      }
      const batch = parts[1] === "batch";
      const items = batch ? body : [body];
      if (batch && (!Array.isArray(body) || body.length === 0 || body.length > 100)) {
        return sendError(res, 422, "validation_error", "A batch must be an array of 1 to 100 e-mails.");
      }
      for (const [i, item] of items.entries()) {
        const problem = validateEmail(item);
        if (problem) return sendError(res, 422, "validation_error", batch ? `[${i}] ${problem}` : problem);
      }

      const key = req.headers["idempotency-key"];
      const idemKey = typeof key === "string" && key !== "" ? `${batch ? "batch" : "single"}:${key}` : null;
      const fingerprint = raw;
      if (idemKey && idempotency.has(idemKey)) {
        const prev = idempotency.get(idemKey);
        if (prev.fingerprint !== fingerprint) {
          return sendError(
            res,
            409,
            "invalid_idempotent_request",
            "Same idempotency key used with a different request payload.",
          );
        }
        return sendJson(res, 200, batch ? { data: prev.ids.map((id) => ({ id })) } : { id: prev.ids[0] });
      }
      const ids = items.map(store);
      if (idemKey) {
        idempotency.set(idemKey, { ids, fingerprint });
        persistIdempotency();
      }
      return sendJson(res, 200, batch ? { data: ids.map((id) => ({ id })) } : { id: ids[0] });
    }

    if (req.method === "GET" && parts.length === 1) {
      const to = url.searchParams.get("to");
      const limitRaw = Number(url.searchParams.get("limit") ?? 100);
      const limit = Number.isFinite(limitRaw) && limitRaw > 0 ? Math.min(limitRaw, 1000) : 100;
      let list = [...messages.values()].reverse();
      if (to) {
        const needle = to.toLowerCase();
        list = list.filter((m) => m.to.some((addr) => addr.toLowerCase().includes(needle)));
      }
      return sendJson(res, 200, { object: "list", has_more: list.length > limit, data: list.slice(0, limit) });
    }

    if (req.method === "GET" && parts.length === 2) {
      const rec = messages.get(parts[1]);
      if (!rec) return sendError(res, 404, "not_found", "Email not found.");
      return sendJson(res, 200, rec);
    }

    if (req.method === "DELETE" && parts.length === 1) {
      const n = messages.size;
      for (const name of fs.readdirSync(outboxDir)) {
        if (name.endsWith(".json")) fs.rmSync(path.join(outboxDir, name), { force: true });
      }
      messages.clear();
      idempotency.clear();
      return sendJson(res, 200, { deleted: n });
    }

    return sendError(res, 405, "method_not_allowed", "Method not allowed.");
  };

  const server = http.createServer((req, res) => {
    handler(req, res).catch((err) => {
      log("mail fake error", err);
      if (!res.headersSent) sendError(res, 500, "application_error", String(err?.message ?? err));
    });
  });
  await new Promise((resolve, reject) => {
    server.once("error", reject);
    server.listen(port, host, resolve);
  });
  const actualPort = server.address().port;
  return {
    server,
    port: actualPort,
    url: `http://${host}:${actualPort}`,
    outboxDir,
    close: () => new Promise((resolve) => server.close(() => resolve())),
  };
}

function argValue(name) {
  const i = process.argv.indexOf(`--${name}`);
  return i >= 0 ? process.argv[i + 1] : undefined;
}

const isMain = process.argv[1] && import.meta.url === pathToFileURL(path.resolve(process.argv[1])).href;
if (isMain) {
  const port = Number(argValue("port") ?? process.env.MAIL_FAKE_PORT ?? 9020);
  const host = argValue("host") ?? process.env.MAIL_FAKE_HOST ?? "127.0.0.1";
  const outboxDir = path.resolve(argValue("dir") ?? process.env.MAIL_OUTBOX_DIR ?? ".data/mail");
  const fake = await startMailFake({ port, host, outboxDir });
  console.log(`mail fake listening on ${fake.url}, outbox ${outboxDir}`);
  const stop = () => fake.close().then(() => process.exit(0));
  process.on("SIGINT", stop);
  process.on("SIGTERM", stop);
  // Exit when the parent supervisor disappears (e.g. killed with SIGKILL).
  const parent = process.ppid;
  setInterval(() => {
    if (process.ppid !== parent) stop();
  }, 2000).unref();
}
