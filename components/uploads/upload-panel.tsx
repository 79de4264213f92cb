"use client";

import { useQuery, useQueryClient } from "@tanstack/react-query";
import { useCallback, useRef, useState, type DragEvent } from "react";
import pLimit from "p-limit";
import { Badge } from "@/components/ui/badge";
import { Button } from "@/components/ui/button";
import { Notice } from "@/components/ui/card";
import { api, ApiError } from "@/lib/api-client";
import { queryKeys } from "@/lib/query-keys";
import { counted } from "@/lib/format";
import { filesFromDrop, formatBytes, putWithProgress, sha256Hex, splitFiles } from "./files";
import { failuresFirst, STATE_LABEL, uploadSummary } from "./summary";

type ServerUpload = {
  id: string;
  name: string;
  size: number;
  status: "pending" | "queued" | "processing" | "done" | "failed";
  message: string | null;
  retryable?: boolean;
  warnings: string[];
  spectraCount: number;
  curvesCount?: number;
};
type Ticket = {
  id: string;
  name: string;
  status: string;
  duplicate: boolean;
  url: string | null;
  headers: Record<string, string>;
  expiresInSeconds?: number | null;
  /** When the server issued the URL (ms, this browser's clock). */
  issuedAt?: number;
};
type LocalState = {
  key: string;
  name: string;
  size: number;
  phase: "hashing" | "registering" | "uploading" | "sent" | "error";
  progress: number;
  uploadId?: string;
  duplicate?: boolean;
  message?: string;
};

const TERMINAL = new Set(["done", "failed"]);
const PUT_CONCURRENCY = 4;

/**
 * Drag and drop (or pick) files, folders or zips: each file is hashed in the browser, registered
 * with the API, sent straight to object storage with its presigned PUT (with progress), then
 * processed in the background; its row follows it live until done or failed.
 */
export function UploadPanel({
  lab,
  sessionId,
  canUpload,
  initial,
}: {
  lab: string;
  sessionId: string;
  canUpload: boolean;
  initial: ServerUpload[];
}) {
  const qc = useQueryClient();
  const [local, setLocal] = useState<Record<string, LocalState>>({});
  const [notice, setNotice] = useState<{ tone: "warn" | "danger"; text: string } | null>(null);
  const [over, setOver] = useState(false);
  const fileInput = useRef<HTMLInputElement>(null);
  const folderInput = useRef<HTMLInputElement>(null);

  const { data: server = initial } = useQuery({
    queryKey: queryKeys.sessionUploads(sessionId),
    queryFn: async () => (await api<{ uploads: ServerUpload[] }>(lab, "GET", `/sessions/${sessionId}/uploads`)).uploads,
    initialData: initial,
    refetchInterval: (q) =>
      (q.state.data ?? []).some((u) => !TERMINAL.has(u.status)) ||
      Object.values(local).some((l) => l.phase !== "sent" && l.phase !== "error")
        ? 1000
        : false,
  });

  const patch = useCallback(
    (key: string, p: Partial<LocalState>) => setLocal((s) => ({ ...s, [key]: { ...s[key], ...p } })),
    [],
  );

  const start = useCallback(
    async (files: File[], skipped: string[]) => {
      setNotice(
        skipped.length
          ? {
              tone: "warn",
              text:
                `Skipped ${counted(skipped.length, "file")} that ${skipped.length === 1 ? "is" : "are"} not spectra ` +
                `(csv, tsv, txt, dat, json or zip): ${skipped.slice(0, 5).join(", ")}${skipped.length > 5 ? "…" : ""}`,
            }
          : null,
      );
      if (files.length === 0) return;
      const batchId = Date.now().toString(36);
      const keyed = files.map((f, i) => ({ key: `${batchId}-${i}`, file: f }));
      setLocal((s) => ({
        ...s,
        ...Object.fromEntries(
          keyed.map(({ key, file }) => [
            key,
            { key, name: file.name, size: file.size, phase: "hashing", progress: 0 } satisfies LocalState,
          ]),
        ),
      }));
      const hashed: { key: string; file: File; sha256: string }[] = [];
      for (const k of keyed) hashed.push({ ...k, sha256: await sha256Hex(k.file) });
      let tickets: Ticket[] = [];
      try {
        for (let i = 0; i < hashed.length; i += 100) {
          const part = hashed.slice(i, i + 100);
          part.forEach((h) => patch(h.key, { phase: "registering" }));
          const res = await api<{ uploads: Ticket[] }>(lab, "POST", "/uploads", {
            sessionId,
            files: part.map((h) => ({ name: h.file.name, size: h.file.size, sha256: h.sha256 })),
          });
          const issuedAt = Date.now();
          tickets = tickets.concat(res.uploads.map((t) => ({ ...t, issuedAt })));
        }
      } catch (e) {
        const message = e instanceof ApiError ? e.message : "The upload could not be registered.";
        hashed.forEach((h) => patch(h.key, { phase: "error", message }));
        setNotice({ tone: "danger", text: message });
        return;
      }
      const work = hashed.map((h, i) => ({ ...h, ticket: tickets[i] }));
      const sendOne = async ({ key, file, ticket, sha256 }: (typeof work)[number]) => {
        patch(key, { uploadId: ticket.id, duplicate: ticket.duplicate });
        if (ticket.duplicate) {
          patch(key, { phase: "sent", progress: 1 });
          return;
        }
        try {
          patch(key, { phase: "uploading" });
          // URLs live a few minutes: one near its end is asked for again before sending.
          const left = (ticket.issuedAt ?? 0) + (ticket.expiresInSeconds ?? Infinity) * 1000 - Date.now();
          const again = { sessionId, files: [{ name: file.name, size: file.size, sha256 }] };
          const now = left > 60_000 ? ticket : (await api<{ uploads: Ticket[] }>(lab, "POST", "/uploads", again)).uploads[0];
          if (now.url) await putWithProgress(now.url, file, now.headers, (p) => patch(key, { progress: p }));
          await api(lab, "POST", `/uploads/${ticket.id}/complete`);
          patch(key, { phase: "sent", progress: 1 });
        } catch (e) {
          patch(key, { phase: "error", message: e instanceof Error ? e.message : String(e) });
        }
      };
      const limit = pLimit(PUT_CONCURRENCY);
      await Promise.all(work.map((w) => limit(() => sendOne(w))));
      await qc.invalidateQueries({ queryKey: queryKeys.sessionUploads(sessionId) });
    },
    [lab, sessionId, patch, qc],
  );

  const onDrop = async (e: DragEvent) => {
    e.preventDefault();
    setOver(false);
    if (!canUpload) return;
    const { files, skipped } = await filesFromDrop(e.dataTransfer);
    void start(files, skipped);
  };

  const retry = async (id: string) => {
    try {
      await api(lab, "POST", `/uploads/${id}/retry`);
    } catch (e) {
      setNotice({ tone: "danger", text: e instanceof ApiError ? e.message : "Retry failed." });
    }
    await qc.invalidateQueries({ queryKey: queryKeys.sessionUploads(sessionId) });
  };

  // One row per file: the server's record when it has one, else what the browser is doing.
  const byId = new Map(server.map((u) => [u.id, u]));
  const localRows = Object.values(local);
  const shownIds = new Set<string>();
  const rows = [
    ...localRows.map((l) => {
      const s = l.uploadId ? byId.get(l.uploadId) : undefined;
      if (l.uploadId) shownIds.add(l.uploadId);
      const status =
        l.phase === "error" ? "error" : s && (l.phase === "sent" || s.status !== "pending") ? s.status : l.phase;
      // A file the browser could not send is sent again by dropping it again: no server retry.
      return {
        key: l.key,
        id: l.uploadId,
        name: l.name,
        size: l.size,
        status,
        progress: l.progress,
        duplicate: l.duplicate,
        message: l.phase === "error" ? l.message : s?.message,
        retryable: l.phase !== "error" && Boolean(s?.retryable),
        spectra: s?.spectraCount ?? 0,
        curves: s?.curvesCount ?? 0,
        warnings: s?.warnings ?? [],
      };
    }),
    ...server
      .filter((u) => !shownIds.has(u.id))
      .map((u) => ({
        key: u.id,
        id: u.id,
        name: u.name,
        size: u.size,
        status: u.status,
        progress: u.status === "pending" ? 0 : 1,
        duplicate: false,
        message: u.message,
        retryable: Boolean(u.retryable),
        spectra: u.spectraCount,
        curves: u.curvesCount ?? 0,
        warnings: u.warnings,
      })),
  ];
  // Failures lead the list, so their messages are in view rather than at the end of the scroll box.
  const listed = failuresFirst(rows);
  const active = localRows.filter((l) => l.phase === "uploading" || l.phase === "hashing" || l.phase === "registering");
  const totalBytes = localRows.reduce((a, l) => a + l.size, 0);
  const sentBytes = localRows.reduce((a, l) => a + l.size * (l.phase === "sent" ? 1 : l.progress), 0);

  return (
    <div className="space-y-4" data-testid="upload-panel">
      {canUpload ? (
        <div
          onDragOver={(e) => {
            e.preventDefault();
            setOver(true);
          }}
          onDragLeave={() => setOver(false)}
          onDrop={onDrop}
          data-testid="dropzone"
          className={
            `rounded-xl border-2 border-dashed px-6 py-8 text-center transition-colors ` +
            `${over ? "border-copper bg-copper-soft/60" : "border-line bg-paper/60"}`
          }
        >
          <p className="font-medium">Drop spectra here — files, folders or zip archives</p>
          <p className="mt-1 text-sm text-ink-soft">
            csv, tsv, txt, dat or json; several dI/dV columns become several spectra. Files go straight to storage;
            nothing is lost if processing fails.
          </p>
          <div className="mt-4 flex justify-center gap-2">
            <Button type="button" variant="secondary" onClick={() => fileInput.current?.click()}>
              Choose files
            </Button>
            <Button type="button" variant="secondary" onClick={() => folderInput.current?.click()}>
              Choose a folder
            </Button>
          </div>
          <input
            ref={fileInput}
            type="file"
            multiple
            className="sr-only"
            data-testid="file-input"
            aria-label="Choose spectrum files"
            onChange={(e) => {
              const { files, skipped } = splitFiles([...(e.target.files ?? [])]);
              void start(files, skipped);
              e.target.value = "";
            }}
          />
          <input
            ref={folderInput}
            type="file"
            multiple
            className="sr-only"
            aria-label="Choose a folder of spectra"
            {...({ webkitdirectory: "" } as Record<string, string>)}
            onChange={(e) => {
              const { files, skipped } = splitFiles([...(e.target.files ?? [])]);
              void start(files, skipped);
              e.target.value = "";
            }}
          />
        </div>
      ) : null}
      {notice ? <Notice tone={notice.tone}>{notice.text}</Notice> : null}
      {active.length > 0 && totalBytes > 0 ? (
        <div aria-live="polite">
          <div className="flex justify-between text-xs text-muted">
            <span>Sending {counted(active.length, "file")}…</span>
            <span className="num">
              {formatBytes(sentBytes)} / {formatBytes(totalBytes)}
            </span>
          </div>
          <div
            className="mt-1 h-2 overflow-hidden rounded-full bg-line"
            role="progressbar"
            aria-label="Overall upload progress"
            aria-valuemin={0}
            aria-valuemax={100}
            aria-valuenow={Math.round((100 * sentBytes) / totalBytes)}
          >
            <div
              className="h-full bg-teal transition-[width]"
              style={{ width: `${(100 * sentBytes) / totalBytes}%` }}
            />
          </div>
        </div>
      ) : null}
      {rows.length ? (
        <>
          <p className="text-xs text-muted" data-testid="upload-counts">
            {uploadSummary(rows.map((r) => r.status))}
          </p>
          <ul
            className="max-h-96 divide-y divide-line overflow-y-auto rounded-lg border border-line bg-card"
            data-testid="upload-rows"
          >
            {listed.map((r) => {
              const s = STATE_LABEL[r.status] ?? STATE_LABEL.queued;
              return (
                <li key={r.key} className="px-4 py-2.5 text-sm" data-testid="upload-row" data-status={r.status}>
                  <div className="flex flex-wrap items-center justify-between gap-2">
                    <span className="min-w-0 truncate font-medium" title={r.name}>
                      {r.name} <span className="num text-xs font-normal text-muted">{formatBytes(r.size)}</span>
                    </span>
                    <span className="flex items-center gap-2">
                      {r.duplicate ? (
                        <Badge title="The same bytes (SHA-256) are already in this lab; not stored twice">
                          already uploaded
                        </Badge>
                      ) : null}
                      {r.status === "done" ? (
                        <span className="num text-xs text-ink-soft">
                          {counted(r.spectra, "spectrum", "spectra")}
                          {r.curves ? `, ${counted(r.curves, "I(z) curve")}` : ""}
                          {r.warnings.length ? `, ${counted(r.warnings.length, "warning")}` : ""}
                        </span>
                      ) : null}
                      <Badge tone={s.tone}>
                        <span aria-hidden>{s.icon}</span> {s.label}
                      </Badge>
                      {r.status === "failed" && r.retryable && r.id && canUpload ? (
                        <Button
                          type="button"
                          variant="secondary"
                          className="px-2 py-1 text-xs"
                          onClick={() => retry(r.id!)}
                        >
                          Retry
                        </Button>
                      ) : null}
                    </span>
                  </div>
                  {r.status === "uploading" ? (
                    <div
                      className="mt-1.5 h-1 overflow-hidden rounded-full bg-line"
                      role="progressbar"
                      aria-label={`Upload of ${r.name}`}
                      aria-valuenow={Math.round(r.progress * 100)}
                      aria-valuemin={0}
                      aria-valuemax={100}
                    >
                      <div className="h-full bg-teal" style={{ width: `${r.progress * 100}%` }} />
                    </div>
                  ) : null}
                  {r.message && (r.status === "failed" || r.status === "error") ? (
                    <pre className="mt-1.5 whitespace-pre-wrap font-sans text-xs text-danger">{r.message}</pre>
                  ) : null}
                  {r.status === "failed" && !r.retryable ? (
                    <p className="mt-1 text-xs text-ink-soft">
                      Correct the file and upload it again: a retry would read the same bytes and fail the same way.
                    </p>
                  ) : r.status === "error" ? (
                    <p className="mt-1 text-xs text-ink-soft">
                      The file did not reach the server: drop it again to send it.
                    </p>
                  ) : null}
                  {r.status === "done" && r.warnings.length ? (
                    <details className="mt-1 text-xs text-ink-soft">
                      <summary className="cursor-pointer">warnings</summary>
                      <ul className="mt-1 list-disc pl-5">
                        {r.warnings.slice(0, 20).map((w, i) => (
                          <li key={i}>{w}</li>
                        ))}
                      </ul>
                    </details>
                  ) : null}
                </li>
              );
            })}
          </ul>
        </>
      ) : null}
    </div>
  );
}
