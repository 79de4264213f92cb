// Small process and port helpers (Linux /proc based; no extra packages).

import fs from "node:fs";
import net from "node:net";

export function isAlive(pid: number): boolean {
  if (!Number.isInteger(pid) || pid <= 0) return false;
  try {
    process.kill(pid, 0);
    return true;
  } catch (e) {
    return (e as NodeJS.ErrnoException).code === "EPERM";
  }
}

export function cmdline(pid: number): string {
  try {
    return fs.readFileSync(`/proc/${pid}/cmdline`, "utf8").split("\0").filter(Boolean).join(" ");
  } catch {
    return "";
  }
}

export function procCwd(pid: number): string | null {
  try {
    return fs.readlinkSync(`/proc/${pid}/cwd`);
  } catch {
    return null;
  }
}

/** Resolves true when something accepts TCP connections on host:port. */
export function portOpen(port: number, host = "127.0.0.1", timeoutMs = 500): Promise<boolean> {
  return new Promise((resolve) => {
    const sock = net.connect({ port, host });
    const done = (v: boolean) => {
      sock.destroy();
      resolve(v);
    };
    sock.setTimeout(timeoutMs, () => done(false));
    sock.once("connect", () => done(true));
    sock.once("error", () => done(false));
  });
}

/** Resolves true when we can bind host:port ourselves right now. */
export function portFree(port: number, host = "127.0.0.1"): Promise<boolean> {
  return new Promise((resolve) => {
    const srv = net.createServer();
    srv.once("error", () => resolve(false));
    srv.listen(port, host, () => srv.close(() => resolve(true)));
  });
}

function listeningInodes(port: number): Set<string> {
  const inodes = new Set<string>();
  for (const file of ["/proc/net/tcp", "/proc/net/tcp6"]) {
    let text: string;
    try {
      text = fs.readFileSync(file, "utf8");
    } catch {
      continue;
    }
    for (const line of text.split("\n").slice(1)) {
      const cols = line.trim().split(/\s+/);
      if (cols.length < 10) continue;
      const local = cols[1]!;
      const state = cols[3];
      const localPort = parseInt(local.split(":")[1] ?? "", 16);
      if (state === "0A" && localPort === port) inodes.add(cols[9]!);
    }
  }
  return inodes;
}

/** PIDs of processes (that we may inspect) holding a listening socket on `port`. */
export function listenerPids(port: number): number[] {
  const inodes = listeningInodes(port);
  if (inodes.size === 0) return [];
  const pids: number[] = [];
  for (const entry of fs.readdirSync("/proc")) {
    if (!/^\d+$/.test(entry)) continue;
    let fds: string[];
    try {
      fds = fs.readdirSync(`/proc/${entry}/fd`);
    } catch {
      continue;
    }
    for (const fd of fds) {
      try {
        const target = fs.readlinkSync(`/proc/${entry}/fd/${fd}`);
        const m = /^socket:\[(\d+)\]$/.exec(target);
        if (m && inodes.has(m[1]!)) {
          pids.push(Number(entry));
          break;
        }
      } catch {
        // fd closed meanwhile
      }
    }
  }
  return pids;
}

export const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** Send `signal` to the process group of `pid` (falls back to the process itself). */
export function killTree(pid: number, signal: NodeJS.Signals): void {
  try {
    process.kill(-pid, signal);
    return;
  } catch {
    // not a group leader
  }
  try {
    process.kill(pid, signal);
  } catch {
    // already gone
  }
}

/** SIGTERM the group, wait up to `graceMs`, then SIGKILL. */
export async function terminate(pid: number, graceMs = 8000): Promise<void> {
  if (!isAlive(pid)) return;
  killTree(pid, "SIGTERM");
  const until = Date.now() + graceMs;
  while (Date.now() < until) {
    if (!isAlive(pid)) return;
    await sleep(100);
  }
  killTree(pid, "SIGKILL");
  await sleep(100);
}
