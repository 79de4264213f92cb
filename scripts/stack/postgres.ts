// A project-local PostgreSQL cluster from Debian's packages, on loopback and a port of our own.

import { spawnSync } from "node:child_process";
import { createHash } from "node:crypto";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import pg from "pg";
import { cmdline, isAlive, listenerPids, portFree, procCwd, sleep } from "./proc";

export interface PgOptions {
  /** the data folder of the stack (.data or .test-data) */
  dataDir: string;
  port: number;
  user: string;
  password: string;
  database: string;
  /** test clusters trade durability for speed */
  fast?: boolean;
  log: (msg: string) => void;
}

export interface PgCluster {
  pgdata: string;
  socketDir: string;
  logFile: string;
  binDir: string;
  /** true when this run started the server (so it must stop it) */
  startedHere: boolean;
}

const isRoot = () => process.getuid?.() === 0;

export function findPgBin(): string | null {
  if (process.env.PG_BIN && fs.existsSync(path.join(process.env.PG_BIN, "initdb"))) return process.env.PG_BIN;
  const base = "/usr/lib/postgresql";
  let versions: string[] = [];
  try {
    versions = fs.readdirSync(base).filter((v) => fs.existsSync(path.join(base, v, "bin", "initdb")));
  } catch {
    return null;
  }
  versions.sort((a, b) => Number(b) - Number(a));
  return versions[0] ? path.join(base, versions[0], "bin") : null;
}

function userNameOf(uid: number): string | null {
  try {
    for (const line of fs.readFileSync("/etc/passwd", "utf8").split("\n")) {
      const f = line.split(":");
      if (Number(f[2]) === uid) return f[0]!;
    }
  } catch {
    // no passwd file
  }
  return null;
}

function uidGidOf(name: string): { uid: number; gid: number } | null {
  try {
    for (const line of fs.readFileSync("/etc/passwd", "utf8").split("\n")) {
      const f = line.split(":");
      if (f[0] === name) return { uid: Number(f[2]), gid: Number(f[3]) };
    }
  } catch {
    // no passwd file
  }
  return null;
}

/** As root, the server runs as the owner of an existing cluster folder, else as `postgres`. */
function serverUser(pgdata: string): string | null {
  if (!isRoot()) return null;
  try {
    const st = fs.statSync(pgdata);
    if (st.uid !== 0) return userNameOf(st.uid) ?? "postgres";
  } catch {
    // not created yet
  }
  return "postgres";
}

function run(
  binDir: string,
  asUser: string | null,
  cmd: string,
  args: string[],
): { status: number; out: string } {
  const exe = path.join(binDir, cmd);
  const [file, argv] = asUser ? ["runuser", ["-u", asUser, "--", exe, ...args]] : [exe, args];
  // cwd "/" so the server user never needs access to the current folder.
  const r = spawnSync(file, argv, { cwd: "/", encoding: "utf8", env: { ...process.env, LC_ALL: "C.UTF-8" } });
  if (r.error) throw r.error;
  return { status: r.status ?? 1, out: `${r.stdout ?? ""}${r.stderr ?? ""}` };
}

function canAccess(user: string | null, dir: string): boolean {
  if (!user) return true;
  const r = spawnSync("runuser", ["-u", user, "--", "test", "-w", dir, "-a", "-x", dir], { cwd: "/" });
  return r.status === 0;
}

function chownTo(user: string | null, ...paths: string[]) {
  if (!user) return;
  const ids = uidGidOf(user);
  if (!ids) throw new Error(`system user ${user} not found (is the postgresql package installed?)`);
  for (const p of paths) fs.chownSync(p, ids.uid, ids.gid);
}

function tail(file: string, lines = 30): string {
  try {
    return fs.readFileSync(file, "utf8").split("\n").slice(-lines).join("\n");
  } catch {
    return "(no log)";
  }
}

/**
 * Where the cluster lives. Normally <data>/pg with its socket in <data>/pg-run. When running as root in
 * a folder the `postgres` user cannot enter (e.g. a clone under /root), the cluster is placed under
 * /var/lib/bandcross/<hash> and <data>/pg becomes a symlink to it.
 */
function layout(dataDir: string, user: string | null): { pgdata: string; socketDir: string; home: string } {
  const link = path.join(dataDir, "pg");
  let pgdata = link;
  try {
    if (fs.lstatSync(link).isSymbolicLink()) pgdata = fs.realpathSync(link);
  } catch {
    // not created yet
  }
  const home = path.dirname(pgdata);
  if (pgdata === link && !fs.existsSync(link) && user) {
    fs.mkdirSync(link, { recursive: true, mode: 0o700 });
    chownTo(user, link);
    if (!canAccess(user, link)) {
      fs.rmdirSync(link);
      const alt = path.join("/var/lib/bandcross", createHash("sha1").update(path.resolve(dataDir)).digest("hex").slice(0, 12));
      // <data> was deleted (a reset): an old cluster there belongs to the old secrets, so it goes too.
      fs.rmSync(alt, { recursive: true, force: true });
      fs.mkdirSync(path.join(alt, "pg"), { recursive: true, mode: 0o700 });
      fs.chmodSync("/var/lib/bandcross", 0o755);
      fs.chmodSync(alt, 0o755);
      chownTo(user, path.join(alt, "pg"));
      fs.symlinkSync(path.join(alt, "pg"), link);
      return { pgdata: path.join(alt, "pg"), socketDir: socketDirFor(alt), home: alt };
    }
  }
  return { pgdata, socketDir: socketDirFor(home), home };
}

function socketDirFor(home: string): string {
  const dir = path.join(home, "pg-run");
  // A Unix socket path is limited to 107 bytes: fall back to /tmp for very deep folders.
  if (Buffer.byteLength(path.join(dir, ".s.PGSQL.65535")) < 100) return dir;
  return path.join(os.tmpdir(), `bandcross-pg-${createHash("sha1").update(home).digest("hex").slice(0, 10)}`);
}

interface PidFile {
  pid: number;
  port: number;
}

function readPidFile(pgdata: string): PidFile | null {
  try {
    const lines = fs.readFileSync(path.join(pgdata, "postmaster.pid"), "utf8").split("\n");
    return { pid: Number(lines[0]), port: Number(lines[3]) };
  } catch {
    return null;
  }
}

/** A postmaster.pid whose process is gone (or is some other program now) is removed. */
function clearStaleLock(pgdata: string, socketDir: string, log: (m: string) => void): PidFile | null {
  const pf = readPidFile(pgdata);
  if (!pf) return null;
  if (isAlive(pf.pid) && /postgres|postmaster/.test(cmdline(pf.pid))) return pf;
  log(`removing stale postmaster.pid (pid ${pf.pid} is not running)`);
  fs.rmSync(path.join(pgdata, "postmaster.pid"), { force: true });
  for (const f of [`.s.PGSQL.${pf.port}`, `.s.PGSQL.${pf.port}.lock`]) fs.rmSync(path.join(socketDir, f), { force: true });
  return null;
}

export async function ensurePostgres(o: PgOptions): Promise<PgCluster> {
  const binDir = findPgBin();
  if (!binDir) throw new Error("PostgreSQL binaries not found under /usr/lib/postgresql/*/bin (apt-get install -y postgresql)");
  fs.mkdirSync(o.dataDir, { recursive: true });
  const user = serverUser(path.join(o.dataDir, "pg"));
  const { pgdata, socketDir, home } = layout(o.dataDir, user);
  // The server writes its own log, so it lives next to the cluster (normally <data>/logs/postgres.log).
  const logFile = path.join(home, "logs", "postgres.log");
  fs.mkdirSync(path.dirname(logFile), { recursive: true });
  fs.mkdirSync(socketDir, { recursive: true, mode: 0o755 });
  if (!fs.existsSync(logFile)) fs.writeFileSync(logFile, "");
  chownTo(user, socketDir, logFile);
  const visibleLog = path.join(o.dataDir, "logs", "postgres.log");
  if (visibleLog !== logFile && !fs.existsSync(visibleLog)) {
    fs.mkdirSync(path.dirname(visibleLog), { recursive: true });
    fs.symlinkSync(logFile, visibleLog);
  }

  // 1. initdb once
  if (!fs.existsSync(path.join(pgdata, "PG_VERSION"))) {
    fs.rmSync(pgdata, { recursive: true, force: true }); // a half-made folder from an interrupted init
    fs.mkdirSync(pgdata, { recursive: true, mode: 0o700 });
    chownTo(user, pgdata);
    const pwfile = path.join(os.tmpdir(), `bandcross-pw-${process.pid}`);
    fs.writeFileSync(pwfile, `${o.password}\n`, { mode: 0o600 });
    chownTo(user, pwfile);
    try {
      o.log(`initdb ${pgdata}${user ? ` (as ${user})` : ""}`);
      const r = run(binDir, user, "initdb", [
        "-D", pgdata, "-U", o.user, `--pwfile=${pwfile}`, "-A", "scram-sha-256", "-E", "UTF8", "--locale=C.UTF-8",
      ]);
      if (r.status !== 0) throw new Error(`initdb failed:\n${r.out}`);
    } finally {
      fs.rmSync(pwfile, { force: true });
    }
    const conf = [
      "",
      "# --- Bandcross local cluster ---",
      "listen_addresses = '127.0.0.1'",
      `port = ${o.port}`,
      `unix_socket_directories = '${socketDir}'`,
      "max_connections = 100",
      ...(o.fast ? ["fsync = off", "synchronous_commit = off", "full_page_writes = off"] : []),
      "",
    ].join("\n");
    fs.appendFileSync(path.join(pgdata, "postgresql.conf"), conf);
  }

  // 2. reuse a running server, or start one
  let running = clearStaleLock(pgdata, socketDir, o.log);
  if (running && running.port !== o.port) {
    o.log(`cluster is running on port ${running.port}, restarting it on ${o.port}`);
    run(binDir, user, "pg_ctl", ["-D", pgdata, "-m", "fast", "-w", "stop"]);
    running = null;
  }
  let startedHere = false;
  if (running) {
    o.log(`PostgreSQL already running (pid ${running.pid}), reusing it`);
  } else {
    if (!(await portFree(o.port))) await stopOrphanedServer(o, pgdata);
    if (!(await portFree(o.port))) {
      const who = listenerPids(o.port).map((p) => `pid ${p}: ${cmdline(p).slice(0, 100)}`).join("; ");
      throw new Error(`port ${o.port} on 127.0.0.1 is used by another program${who ? ` (${who})` : ""}; stop it or free the port`);
    }
    const opts = `-c listen_addresses=127.0.0.1 -p ${o.port} -k ${socketDir}`;
    const r = run(binDir, user, "pg_ctl", ["-D", pgdata, "-l", logFile, "-w", "-t", "60", "-o", opts, "start"]);
    if (r.status !== 0) {
      throw new Error(`pg_ctl start failed:\n${r.out}\n--- ${logFile} ---\n${tail(logFile)}`);
    }
    startedHere = true;
  }

  // 3. the database
  await createDatabaseIfMissing(o);
  return { pgdata, socketDir, logFile, binDir, startedHere };
}

/**
 * A postmaster of this project's cluster that lost its lock file — typically because the data folder
 * was deleted while it ran — still holds the port. It serves nothing useful: stop it.
 */
async function stopOrphanedServer(o: PgOptions, pgdata: string) {
  for (const pid of listenerPids(o.port)) {
    const cwd = procCwd(pid)?.replace(/ \(deleted\)$/, "");
    if (!/postgres|postmaster/.test(cmdline(pid)) || cwd !== pgdata) continue;
    o.log(`stopping an orphaned PostgreSQL server of this folder (pid ${pid}) that holds port ${o.port}`);
    try {
      process.kill(pid, "SIGINT"); // fast shutdown
    } catch {
      continue;
    }
    for (let i = 0; i < 100 && isAlive(pid); i++) await sleep(100);
    if (isAlive(pid)) process.kill(pid, "SIGQUIT"); // immediate shutdown
    for (let i = 0; i < 50 && isAlive(pid); i++) await sleep(100);
  }
}

async function createDatabaseIfMissing(o: PgOptions) {
  const deadline = Date.now() + 20_000;
  for (;;) {
    const client = new pg.Client({ host: "127.0.0.1", port: o.port, user: o.user, password: o.password, database: "postgres" });
    try {
      await client.connect();
      const r = await client.query("SELECT 1 FROM pg_database WHERE datname = $1", [o.database]);
      if (r.rowCount === 0) {
        o.log(`creating database ${o.database}`);
        await client.query(`CREATE DATABASE "${o.database.replace(/"/g, '""')}"`);
      }
      return;
    } catch (e) {
      if (Date.now() > deadline) throw e;
      await sleep(300);
    } finally {
      await client.end().catch(() => {});
    }
  }
}

export function stopPostgres(dataDir: string, mode: "fast" | "immediate" = "fast"): void {
  const binDir = findPgBin();
  if (!binDir) return;
  const link = path.join(dataDir, "pg");
  let pgdata = link;
  try {
    pgdata = fs.realpathSync(link);
  } catch {
    return;
  }
  if (!fs.existsSync(path.join(pgdata, "postmaster.pid"))) return;
  const r = run(binDir, serverUser(pgdata), "pg_ctl", ["-D", pgdata, "-m", mode, "-w", "-t", "30", "stop"]);
  if (r.status !== 0 && readPidFile(pgdata) && isAlive(readPidFile(pgdata)!.pid)) {
    throw new Error(`pg_ctl stop failed:\n${r.out}`);
  }
}

/** Remove a cluster that lives outside the data folder (the /var/lib/bandcross fallback). */
export function removeClusterStorage(dataDir: string): void {
  const link = path.join(dataDir, "pg");
  try {
    if (fs.lstatSync(link).isSymbolicLink()) {
      const target = fs.realpathSync(link);
      fs.rmSync(path.dirname(target), { recursive: true, force: true });
    }
  } catch {
    // nothing there
  }
}
