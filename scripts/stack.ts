// Brings Bandcross up locally (`start`), runs the whole test suite against a throwaway stack (`test`),
// or runs the web benchmarks against a throwaway stack of their own (`bench`).
//
//   node --import tsx scripts/stack.ts start            (npm start, via scripts/start.sh)
//   node --import tsx scripts/stack.ts test             (npm test, via scripts/test.sh)
//   node --import tsx scripts/stack.ts bench [PART...]  (the web parts of npm run bench, via scripts/bench.ts)
//
// See docker-free-dev.md for ports, folders and how to reset.

import fs from "node:fs";
import path from "node:path";
import { loadOrCreateSecrets, stackEnv, writeEnvFile, PG_USER, DB_NAME, BUCKET, type Ports } from "./stack/env";
import { ensurePostgres, stopPostgres, removeClusterStorage, type PgCluster } from "./stack/postgres";
import { cmdline, isAlive, listenerPids, portFree, portOpen, procCwd, sleep, terminate } from "./stack/proc";
import { Supervisor } from "./stack/supervisor";
import {
  add,
  formatSteps,
  formatTotals,
  parseVitestJson,
  parseVitestText,
  zero,
  type Counts,
  type StepResult,
} from "./stack/summary";

type Mode = "start" | "test" | "bench";

const ROOT = process.cwd();
const t0 = Date.now();
const NODE = process.execPath;
const TSX = ["--import", "tsx"];
const NEXT_BIN = path.join(ROOT, "node_modules/next/dist/bin/next");
const VITEST_BIN = path.join(ROOT, "node_modules/vitest/vitest.mjs");
const CHROMIUM = process.env.CHROMIUM_PATH || "/usr/bin/chromium";

const mode = process.argv[2] as Mode;
if (mode !== "start" && mode !== "test" && mode !== "bench") {
  console.error("usage: stack.ts start|test|bench [vitest args for test | bench parts for bench]");
  process.exit(2);
}
if (!fs.existsSync(path.join(ROOT, "package.json")) || !fs.existsSync(path.join(ROOT, "scripts/stack.ts"))) {
  console.error("stack.ts must be run from the repository root");
  process.exit(2);
}

// BANDCROSS_PORT_OFFSET shifts every port, so a second checkout can run beside this one.
const offset = Number(process.env.BANDCROSS_PORT_OFFSET || 0);
if (!Number.isInteger(offset) || offset < 0 || offset > 20000) {
  console.error("BANDCROSS_PORT_OFFSET must be a whole number between 0 and 20000");
  process.exit(2);
}
const shift = (p: Ports): Ports => ({ pg: p.pg + offset, s3: p.s3 + offset, mail: p.mail + offset, app: p.app + offset });
const cfg =
  mode === "start"
    ? {
        dataDir: path.join(ROOT, ".data"),
        ports: shift({ pg: 54329, s3: 9010, mail: 9020, app: Number(process.env.PORT || 3000) }),
      }
    : mode === "test"
      ? {
          dataDir: path.join(ROOT, ".test-data"),
          ports: shift({ pg: 54339, s3: 9011, mail: 9021, app: 3100 }),
        }
      : {
          dataDir: path.join(ROOT, ".bench-data"),
          ports: shift({ pg: 54349, s3: 9012, mail: 9022, app: 3200 }),
        };
const quiet = mode !== "start";
const logDir = path.join(cfg.dataDir, "logs");
const stateFile = path.join(cfg.dataDir, "stack.json");
const rel = (p: string) => path.relative(ROOT, p) || ".";
const secs = () => `${((Date.now() - t0) / 1000).toFixed(1)} s`;
const say = (msg: string) => console.log(`bandcross ${mode}: ${msg}`);

function fail(msg: string): never {
  console.error(`bandcross ${mode}: ${msg}`);
  process.exit(1);
}

function tail(file: string, lines = 40): string {
  try {
    return fs.readFileSync(file, "utf8").trimEnd().split("\n").slice(-lines).join("\n");
  } catch {
    return "(no log)";
  }
}

// ---------------------------------------------------------------------------------------------------
// Leftovers from an earlier run: a live supervisor (refuse), orphaned children or listeners (stop them).

function readState(): { supervisorPid?: number; children?: Record<string, number> } | null {
  try {
    return JSON.parse(fs.readFileSync(stateFile, "utf8"));
  } catch {
    return null;
  }
}

function isOurs(pid: number): boolean {
  const cwd = procCwd(pid);
  return cwd === ROOT || cmdline(pid).includes(ROOT);
}

/** `npm start`, `npm test` and the bench share the .next build folder: say so when another one is running here. */
function warnIfOtherModeRunning() {
  const others = { start: ".data", test: ".test-data", bench: ".bench-data" } as const;
  const command = { start: "npm start", test: "npm test", bench: "npm run bench" } as const;
  for (const other of Object.keys(others) as Mode[]) {
    if (other === mode) continue;
    try {
      const pid = JSON.parse(fs.readFileSync(path.join(ROOT, others[other], "stack.json"), "utf8")).supervisorPid as number;
      if (pid && isAlive(pid) && /stack\.ts/.test(cmdline(pid))) {
        const rebuilds = mode !== "start" && process.env.BANDCROSS_SKIP_BUILD !== "1";
        say(
          `note: \`${command[other]}\` is running from this folder (pid ${pid}); both use .next, ` +
            `so ${other === "start" && rebuilds ? "restart npm start afterwards" : "its build may be replaced"}`,
        );
      }
    } catch {
      // not running
    }
  }
}

async function reclaim(): Promise<void> {
  warnIfOtherModeRunning();
  const state = readState();
  const sup = state?.supervisorPid;
  if (sup && sup !== process.pid && isAlive(sup) && /stack\.ts/.test(cmdline(sup))) {
    if (mode === "start") {
      say(`already running (pid ${sup}) at http://localhost:${cfg.ports.app} — stop it with Ctrl-C in its terminal or \`kill ${sup}\``);
      process.exit(0);
    }
    fail(`another ${mode} run is in progress (pid ${sup}); wait for it or \`kill ${sup}\``);
  }
  for (const [name, pid] of Object.entries(state?.children ?? {})) {
    if (pid && isAlive(pid) && isOurs(pid)) {
      say(`stopping leftover ${name} (pid ${pid}) from an earlier run`);
      await terminate(pid, 5000);
    }
  }
  for (const [name, port] of [
    ["storage fake", cfg.ports.s3],
    ["mail fake", cfg.ports.mail],
    ["app", cfg.ports.app],
  ] as const) {
    if (await portFree(port)) continue;
    for (const pid of listenerPids(port)) {
      if (isOurs(pid)) {
        say(`port ${port} is held by a leftover process of ours (pid ${pid}); stopping it`);
        await terminate(pid, 5000);
      }
    }
    if (!(await portFree(port))) {
      const who = listenerPids(port)
        .map((p) => `pid ${p}: ${cmdline(p).slice(0, 120)}`)
        .join("; ");
      fail(`port ${port} (${name}) on 127.0.0.1 is used by another program${who ? ` (${who})` : ""}; free it and retry`);
    }
  }
}

// ---------------------------------------------------------------------------------------------------

const sup = new Supervisor(ROOT, stateFile);
let pgCluster: PgCluster | null = null;
let serviceFailure: string | null = null;
let shuttingDown = false;

async function shutdown(code: number, note?: string): Promise<never> {
  if (shuttingDown) {
    // second Ctrl-C: stop waiting
    process.exit(code);
  }
  shuttingDown = true;
  if (note) say(note);
  await sup.stopAll();
  try {
    stopPostgres(cfg.dataDir, "fast");
  } catch (e) {
    console.error(String((e as Error).message ?? e));
  }
  sup.clearState();
  if (!quiet) say(`stopped (${secs()})`);
  process.exit(code);
}

for (const sig of ["SIGINT", "SIGTERM"] as const) {
  process.on(sig, () => {
    if (!shuttingDown && !quiet) process.stdout.write("\n");
    void shutdown(mode === "start" ? 0 : 130, quiet ? undefined : `${sig}: stopping everything`);
  });
}
process.on("SIGHUP", () => void shutdown(mode === "start" ? 0 : 129));

let appIsUp = false;
let workerSpec: Parameters<Supervisor["start"]>[0] | null = null;
const workerCrashes: number[] = [];

sup.onUnexpectedExit = (name, code) => {
  const log = path.join(logDir, `${name}.log`);
  // Once the app is up, a crashing worker is restarted (at most 3 times a minute): queued jobs are
  // kept in PostgreSQL and picked up again. A crash during start-up, or of anything else, stops all.
  if (mode === "start" && name === "worker" && appIsUp && workerSpec) {
    const now = Date.now();
    workerCrashes.push(now);
    while (workerCrashes.length && workerCrashes[0]! < now - 60_000) workerCrashes.shift();
    if (workerCrashes.length <= 3) {
      console.error(`bandcross start: worker exited (code ${code}); restarting it in 2 s — see ${rel(log)}`);
      const spec = workerSpec;
      setTimeout(() => {
        if (!shuttingDown) sup.start(spec);
      }, 2000);
      return;
    }
  }
  if (mode === "start") {
    console.error(`bandcross start: ${name} exited unexpectedly (code ${code}); last lines of ${rel(log)}:\n${tail(log)}`);
    void shutdown(1);
  } else {
    serviceFailure = `${name} exited (code ${code}), see ${rel(log)}`;
    console.error(`bandcross ${mode}: ${serviceFailure}`);
  }
};

async function waitFor(what: string, check: () => Promise<boolean>, name: string, timeoutMs: number) {
  const until = Date.now() + timeoutMs;
  while (Date.now() < until) {
    if (await check()) return;
    if (!sup.isRunning(name)) throw new Error(`${what} exited during start-up; see ${rel(path.join(logDir, `${name}.log`))}:\n${tail(path.join(logDir, `${name}.log`))}`);
    await sleep(200);
  }
  throw new Error(`${what} did not come up within ${timeoutMs / 1000} s; see ${rel(path.join(logDir, `${name}.log`))}`);
}

async function httpReady(url: string): Promise<boolean> {
  try {
    const r = await fetch(url, { redirect: "manual", signal: AbortSignal.timeout(5000) });
    await r.arrayBuffer().catch(() => {});
    return r.status > 0;
  } catch {
    return false;
  }
}

const exists = (p: string) => fs.existsSync(path.join(ROOT, p));

/** After a signal, the shutdown path owns the exit: the interrupted flow just stops here. */
async function checkpoint(): Promise<void> {
  if (shuttingDown) await new Promise(() => {});
}

// ---------------------------------------------------------------------------------------------------

async function bringUpServices(): Promise<Record<string, string>> {
  fs.mkdirSync(logDir, { recursive: true });
  const secrets = loadOrCreateSecrets(cfg.dataDir);
  const env = stackEnv({ dataDir: cfg.dataDir, ports: cfg.ports, secrets, nodeEnv: mode === "test" ? "test" : "production" });
  fs.mkdirSync(env.MAIL_OUTBOX_DIR!, { recursive: true });
  writeEnvFile(
    path.join(cfg.dataDir, "env.local"),
    env,
    `Bandcross ${mode === "start" ? "local" : mode} stack environment, written by scripts/stack.ts on every start.\n` +
      `Use it from a shell:  set -a; . ${rel(cfg.dataDir)}/env.local; set +a\nor:  node --env-file=${rel(cfg.dataDir)}/env.local ...`,
  );

  const t = Date.now();
  pgCluster = await ensurePostgres({
    dataDir: cfg.dataDir,
    port: cfg.ports.pg,
    user: PG_USER,
    password: secrets.PG_PASSWORD,
    database: DB_NAME,
    fast: mode === "test",
    log: (m) => !quiet && say(m),
  });
  if (!quiet) say(`PostgreSQL ready on 127.0.0.1:${cfg.ports.pg} (${((Date.now() - t) / 1000).toFixed(1)} s)`);

  const childEnv = { ...process.env, ...env };
  sup.start({
    name: "storage",
    cmd: NODE,
    args: ["--openssl-legacy-provider", "storage-fake/s3.mjs", "--port", String(cfg.ports.s3), "--host", "127.0.0.1", "--dir", path.join(cfg.dataDir, "s3"), "--bucket", BUCKET],
    env: childEnv,
    logFile: path.join(logDir, "storage.log"),
  });
  sup.start({
    name: "mail",
    cmd: NODE,
    args: ["storage-fake/mail.mjs", "--port", String(cfg.ports.mail), "--host", "127.0.0.1", "--dir", env.MAIL_OUTBOX_DIR!],
    env: childEnv,
    logFile: path.join(logDir, "mail.log"),
  });
  await waitFor("storage fake", () => portOpen(cfg.ports.s3), "storage", 20_000);
  await waitFor("mail fake", () => httpReady(`http://127.0.0.1:${cfg.ports.mail}/health`), "mail", 20_000);
  if (!quiet) say(`storage fake on 127.0.0.1:${cfg.ports.s3}, mail fake on 127.0.0.1:${cfg.ports.mail}`);
  return env;
}

/** Runs a script to its end; its output goes to its log (and the terminal unless `silent`) and is returned. */
async function oneShot(
  label: string,
  file: string,
  env: Record<string, string | undefined>,
  silent = quiet,
): Promise<string> {
  if (!exists(file)) {
    say(`${file} not found yet — skipping ${label}`);
    return "";
  }
  const logFile = path.join(logDir, `${label}.log`);
  // react-server: the demo seed uses the server-only storage and queue modules.
  const args = ["--conditions=react-server", ...TSX, file];
  const r = await sup.run(label, NODE, args, { env, output: silent ? "log" : "tee", logFile });
  await checkpoint();
  if (r.code !== 0) {
    if (silent) console.error(tail(logFile));
    throw new Error(`${label} (${file}) failed with exit code ${r.code}; see ${rel(logFile)}`);
  }
  return r.output;
}

async function build(env: Record<string, string | undefined>): Promise<boolean> {
  if (process.env.BANDCROSS_SKIP_BUILD === "1" && exists(".next/BUILD_ID")) {
    say("BANDCROSS_SKIP_BUILD=1 — using the existing .next build");
    return true;
  }
  const logFile = path.join(logDir, "build.log");
  if (!quiet) say("next build …");
  const t = Date.now();
  const r = await sup.run("build", NODE, [NEXT_BIN, "build"], {
    env: { ...env, NODE_ENV: "production", NEXT_TELEMETRY_DISABLED: "1" },
    output: quiet ? "log" : "tee",
    logFile,
  });
  if (r.code !== 0 && shuttingDown) return false;
  if (r.code !== 0) {
    if (quiet) console.error(`--- last lines of ${rel(logFile)} ---\n${tail(logFile, 60)}`);
    console.error(`bandcross ${mode}: next build failed (exit ${r.code}); full log in ${rel(logFile)}`);
    return false;
  }
  say(`next build done (${((Date.now() - t) / 1000).toFixed(1)} s)`);
  return true;
}

async function serve(env: Record<string, string | undefined>) {
  const appEnv = { ...env, NODE_ENV: "production", NEXT_TELEMETRY_DISABLED: "1" };
  sup.start({
    name: "app",
    cmd: NODE,
    args: [NEXT_BIN, "start", "-H", "127.0.0.1", "-p", String(cfg.ports.app)],
    env: appEnv,
    logFile: path.join(logDir, "app.log"),
    echo: !quiet,
    graceMs: 10_000,
  });
  if (exists("lib/worker/worker.ts")) {
    workerSpec = {
      name: "worker",
      cmd: NODE,
      // react-server: the worker imports server-only modules, which refuse to load elsewhere.
      args: ["--conditions=react-server", ...TSX, "lib/worker/worker.ts"],
      env: appEnv,
      logFile: path.join(logDir, "worker.log"),
      echo: !quiet,
      graceMs: 15_000,
    };
    sup.start(workerSpec);
  } else if (!quiet) {
    say("lib/worker/worker.ts not found yet — no background worker");
  }
  await waitFor("the app", () => httpReady(`http://127.0.0.1:${cfg.ports.app}/`), "app", 90_000);
}

function demoHint(): string {
  try {
    const readme = fs.readFileSync(path.join(ROOT, "README.md"), "utf8").split("\n");
    const start = readme.findIndex((l) => /^#+\s.*demo accounts/i.test(l));
    if (start >= 0) {
      const body: string[] = [];
      for (const l of readme.slice(start + 1)) {
        if (/^#+\s/.test(l)) break;
        body.push(l.trim());
      }
      // A table "| role | e-mail | password | ... |": print its first three columns, aligned.
      const rows = body
        .filter((l) => l.startsWith("|") && !/^\|[-\s|:]+\|$/.test(l))
        .map((l) => l.split("|").slice(1, 4).map((c) => c.trim().replace(/`/g, "")));
      if (rows.length > 1) {
        const w = [0, 1].map((i) => Math.max(...rows.map((r) => (r[i] ?? "").length)));
        return [
          "Demo accounts (README.md):",
          ...rows.slice(1).map((r) => `    ${(r[0] ?? "").padEnd(w[0]!)}  ${(r[1] ?? "").padEnd(w[1]!)}  ${r[2] ?? ""}`),
        ].join("\n");
      }
      const lines = body.filter((l) => l !== "");
      if (lines.length) return ["Demo accounts (README.md):", ...lines.slice(0, 12).map((l) => `    ${l}`)].join("\n");
    }
  } catch {
    // no README yet
  }
  return 'Demo accounts: see README.md ("Demo accounts").';
}

// ---------------------------------------------------------------------------------------------------

/** Where a new group starts: set up its own lab at /setup with the code, while it has none. */
function setupHint(appUrl: string, code: string): string {
  return [
    "Set up your group's own lab (first owner, lab defaults):",
    `    ${appUrl}/setup   setup code ${code}`,
    "    (one use; every start prints a new code until a lab of your own exists)",
    "",
  ].join("\n");
}

async function startMode() {
  await reclaim();
  // BANDCROSS_DEMO=0: no demo lab (a group's own installation); by default it is seeded once.
  const demo = process.env.BANDCROSS_DEMO !== "0";
  let setupCode: string | undefined;
  say(`data in ${rel(cfg.dataDir)}/`);
  let env: Record<string, string>;
  try {
    env = await bringUpServices();
    const childEnv = { ...process.env, ...env };
    await oneShot("migrate", "scripts/migrate.ts", childEnv);
    if (demo) await oneShot("seed", "scripts/seed.ts", childEnv);
    else say("BANDCROSS_DEMO=0 — starting without the demo lab");
    // While no lab of the group's own exists, a fresh one-time code for /setup (printed below).
    setupCode = /^setup code: (\S+)/m.exec(await oneShot("setup-code", "scripts/setup-code.ts", childEnv, true))?.[1];
    const built = await build(childEnv);
    await checkpoint();
    if (!built) return shutdown(1);
    await serve(childEnv);
    await sleep(300); // a service that dies right away (bad config) is reported before "up"
    await checkpoint();
    appIsUp = true;
  } catch (e) {
    await checkpoint();
    console.error(`bandcross start: ${(e as Error).message ?? e}`);
    return shutdown(1);
  }
  const d = rel(cfg.dataDir);
  console.log(
    [
      "",
      `Bandcross is up (${secs()}):  ${env.APP_URL}`,
      "",
      ...(demo ? [demoHint(), ""] : []),
      ...(setupCode ? [setupHint(env.APP_URL!, setupCode)] : []),
      `  storage fake  ${env.S3_ENDPOINT}/${BUCKET}   files in ${d}/s3`,
      `  mail fake     ${env.RESEND_BASE_URL}/emails   outbox ${d}/mail`,
      `  PostgreSQL    127.0.0.1:${cfg.ports.pg}   psql: set -a; . ${d}/env.local; set +a; psql "$DATABASE_URL"`,
      `  env / logs    ${d}/env.local   ${d}/logs/`,
      "",
      "Press Ctrl-C to stop everything.",
      "",
    ].join("\n"),
  );
}

async function runVitest(project: string, env: Record<string, string | undefined>, extra: string[]) {
  const resultFile = path.join(cfg.dataDir, "results", `${project}.json`);
  fs.mkdirSync(path.dirname(resultFile), { recursive: true });
  console.log(`\n=== ${project} tests ===`);
  const r = await sup.run(
    project,
    NODE,
    [VITEST_BIN, "run", "--project", project, "--passWithNoTests", "--reporter=default", "--reporter=json", `--outputFile.json=${resultFile}`, ...extra],
    { env, output: "tee" },
  );
  let counts: Counts | null = null;
  try {
    counts = parseVitestJson(JSON.parse(fs.readFileSync(resultFile, "utf8")));
  } catch {
    counts = parseVitestText(r.output);
  }
  return { code: r.code, counts };
}

async function testMode() {
  await reclaim();
  // A clean slate every run.
  try {
    stopPostgres(cfg.dataDir, "immediate");
  } catch {
    // nothing running
  }
  removeClusterStorage(cfg.dataDir);
  fs.rmSync(cfg.dataDir, { recursive: true, force: true });
  fs.mkdirSync(cfg.dataDir, { recursive: true });

  const steps: StepResult[] = [];
  let totals = zero();
  let setupOk = true;
  const extra = process.argv.slice(3);
  let env: Record<string, string> = {};
  const testEnv = () => ({
    ...process.env,
    ...env,
    NODE_ENV: "test",
    CHROMIUM_PATH: CHROMIUM,
    BANDCROSS_TEST: "1",
    // The browser tests read the mail outbox page (app/dev/mail), which a production build hides otherwise.
    BANDCROSS_DEV_PAGES: "1",
    ...(process.stdout.isTTY ? { FORCE_COLOR: "1" } : { NO_COLOR: "1", FORCE_COLOR: undefined }),
  });

  console.log(`bandcross test: setting up a fresh stack in ${rel(cfg.dataDir)}/ …`);
  try {
    env = await bringUpServices();
    await oneShot("migrate", "scripts/migrate.ts", { ...process.env, ...env });
    if (process.env.BANDCROSS_TEST_SEED === "1") await oneShot("seed", "scripts/seed.ts", { ...process.env, ...env });
    steps.push({ name: "setup", ok: true });
  } catch (e) {
    await checkpoint();
    console.error(`bandcross test: setup failed: ${(e as Error).message ?? e}`);
    steps.push({ name: "setup", ok: false });
    setupOk = false;
  }
  await checkpoint();
  console.log(`bandcross test: stack ready (${secs()})`);

  const record = (project: string, r: { code: number; counts: Counts | null }) => {
    if (r.counts) totals = add(totals, r.counts);
    const c = r.counts;
    const note = c ? `${c.passed} passed${c.failed ? `, ${c.failed} failed` : ""}${c.skipped ? `, ${c.skipped} skipped` : ""}` : undefined;
    steps.push({ name: project, ok: r.code === 0, note: r.code === 0 ? note : `${note ? `${note}, ` : ""}exit ${r.code}` });
  };

  for (const project of ["unit", "integration"]) {
    if (project === "integration" && !setupOk) {
      steps.push({ name: project, ok: false, note: "not run: setup failed" });
      continue;
    }
    record(project, await runVitest(project, testEnv(), extra));
    await checkpoint();
  }

  if (setupOk) {
    const built = await build(testEnv());
    await checkpoint();
    steps.push({ name: "build", ok: built });
    let served = false;
    if (built) {
      try {
        await serve(testEnv());
        served = true;
      } catch (e) {
        await checkpoint();
        console.error(`bandcross test: ${(e as Error).message ?? e}`);
        steps.push({ name: "serve", ok: false });
      }
    }
    await checkpoint();
    if (served) record("e2e", await runVitest("e2e", testEnv(), extra));
    else steps.push({ name: "e2e", ok: false, note: "not run" });
    await checkpoint();
  } else {
    steps.push({ name: "e2e", ok: false, note: "not run: setup failed" });
  }
  if (serviceFailure) steps.push({ name: "services", ok: false, note: serviceFailure });

  // Stop quietly, then the summary is the last thing printed.
  sup.stopping = true;
  await sup.stopAll();
  try {
    stopPostgres(cfg.dataDir, "fast");
  } catch (e) {
    console.error(String((e as Error).message ?? e));
  }
  sup.clearState();
  const ok = steps.every((s) => s.ok) && totals.failed === 0;
  console.log("");
  console.log(`${formatSteps(steps)} — ${ok ? "all green" : "FAILED"} in ${secs()}`);
  console.log(formatTotals(totals));
  process.exit(ok ? 0 : 1);
}

/**
 * The web benchmarks (scripts/bench/web/*) against a fresh stack in .bench-data/: wiped, migrated,
 * built (unless BANDCROSS_SKIP_BUILD=1), app and worker started, the parts run with the stack's
 * environment, everything stopped. A missed goal is printed as MISSED by the part and does not
 * change the exit status; a stack that cannot come up, or a part that crashes, does.
 */
async function benchMode() {
  await reclaim();
  try {
    stopPostgres(cfg.dataDir, "immediate");
  } catch {
    // nothing running
  }
  removeClusterStorage(cfg.dataDir);
  fs.rmSync(cfg.dataDir, { recursive: true, force: true });
  fs.mkdirSync(cfg.dataDir, { recursive: true });
  const parts = process.argv.slice(3);
  let env: Record<string, string> = {};
  let code = 0;
  console.log(`bandcross bench: setting up a fresh stack in ${rel(cfg.dataDir)}/ …`);
  try {
    env = await bringUpServices();
    const childEnv = { ...process.env, ...env, NEXT_TELEMETRY_DISABLED: "1" };
    await oneShot("migrate", "scripts/migrate.ts", childEnv);
    const built = await build(childEnv);
    await checkpoint();
    if (!built) throw new Error("next build failed");
    await serve(childEnv);
    await sleep(300);
    await checkpoint();
    if (serviceFailure) throw new Error(serviceFailure);
    appIsUp = true;
    console.log(`bandcross bench: stack ready at ${env.APP_URL} (${secs()})`);
    const r = await sup.run("bench", NODE, ["--conditions=react-server", ...TSX, "scripts/bench.ts", ...parts], {
      env: { ...childEnv, BANDCROSS_BENCH_STACK: "1", BANDCROSS_BENCH_DATA: cfg.dataDir, CHROMIUM_PATH: CHROMIUM, NODE_ENV: "production" },
      output: "inherit",
    });
    await checkpoint();
    if (r.code !== 0) {
      console.error(`bandcross bench: the web benchmark exited with code ${r.code}`);
      code = 1;
    }
    if (serviceFailure) {
      console.error(`bandcross bench: ${serviceFailure}`);
      code = 1;
    }
    if (process.env.BANDCROSS_BENCH_KEEP === "1") {
      // For looking into a figure: the stack and its data stay up until Ctrl-C.
      say(`BANDCROSS_BENCH_KEEP=1: the stack stays up at ${env.APP_URL} (env in ${rel(cfg.dataDir)}/env.local); Ctrl-C stops it`);
      await new Promise(() => {});
    }
  } catch (e) {
    await checkpoint();
    console.error(`bandcross bench: ${(e as Error).message ?? e}`);
    code = 1;
  }
  sup.stopping = true;
  await sup.stopAll();
  try {
    stopPostgres(cfg.dataDir, "fast");
  } catch (e) {
    console.error(String((e as Error).message ?? e));
  }
  sup.clearState();
  console.log(`bandcross bench: stack stopped (${secs()}); logs in ${rel(logDir)}/`);
  process.exit(code);
}

(mode === "start" ? startMode() : mode === "test" ? testMode() : benchMode()).catch((e) => {
  console.error(`bandcross ${mode}: ${(e as Error).stack ?? e}`);
  void shutdown(1);
});
