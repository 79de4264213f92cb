import { spawn, type ChildProcess } from "node:child_process";
import path from "node:path";
import type { Browser, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { makeSpectrum, spectrumToCsv } from "@/lib/spectra";
import { APP_URL, launch, shot } from "../support/browser";
import { freshDatabase, type FreshDatabase } from "../support/fresh-db";
import { linkIn, mailsTo } from "../support/outbox";
import { startWorkerProcess, stopWorkerProcess } from "../support/pipeline";

/**
 * A group's first start without the demo lab: an app and a worker of their own on a fresh database
 * (the suite's shared one holds labs already, and setup is open only until one exists), beside the
 * suite's app, on the same build, object store and mail outbox.
 */

const PORT = Number(new URL(APP_URL).port) + 7;
const URL_ = `http://localhost:${PORT}`;
let fresh: FreshDatabase;
let app: ChildProcess | undefined;
let worker: ChildProcess | undefined;
let browser: Browser;
let code: string;
let appLog = "";

const env = () => ({ ...process.env, DATABASE_URL: fresh.url, APP_URL: URL_, AUTH_URL: URL_, PORT: String(PORT) });

/** The start log's line, from the script `npm start` runs (scripts/setup-code.ts). */
function setupCodeFromScript(): Promise<string> {
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, ["--conditions=react-server", "--import", "tsx", "scripts/setup-code.ts"], {
      env: env(),
    });
    let out = "";
    child.stdout.on("data", (d: Buffer) => (out += d.toString()));
    child.stderr.on("data", (d: Buffer) => (out += d.toString()));
    child.on("close", () => {
      const m = /^setup code: (\S+)$/m.exec(out);
      if (m) resolve(m[1]);
      else reject(new Error(`no setup code printed:\n${out}`));
    });
  });
}

async function startApp(): Promise<ChildProcess> {
  const next = path.resolve("node_modules/next/dist/bin/next");
  const child = spawn(process.execPath, [next, "start", "-H", "127.0.0.1", "-p", String(PORT)], {
    env: { ...env(), NODE_ENV: "production", NEXT_TELEMETRY_DISABLED: "1" },
  });
  child.stdout!.on("data", (d: Buffer) => (appLog += d.toString()));
  child.stderr!.on("data", (d: Buffer) => (appLog += d.toString()));
  const until = Date.now() + 60_000;
  while (Date.now() < until) {
    if (child.exitCode !== null) throw new Error(`the app exited:\n${appLog}`);
    try {
      await fetch(`http://127.0.0.1:${PORT}/sign-in`);
      return child;
    } catch {
      await new Promise((r) => setTimeout(r, 250));
    }
  }
  throw new Error(`the app did not come up:\n${appLog}`);
}

beforeAll(async () => {
  fresh = await freshDatabase();
  [app, worker, code, browser] = await Promise.all([
    startApp(),
    startWorkerProcess({ DATABASE_URL: fresh.url, APP_URL: URL_ }),
    setupCodeFromScript(),
    launch(),
  ]);
});

afterAll(async () => {
  await browser?.close();
  await stopWorkerProcess(worker);
  if (app && app.exitCode === null) {
    await new Promise<void>((resolve) => {
      app!.once("exit", () => resolve());
      app!.kill("SIGTERM");
    });
  }
  await fresh?.drop();
});

async function fill(page: Page, form: string, values: Record<string, string>) {
  for (const [name, value] of Object.entries(values))
    await page.fill(`[data-testid="${form}"] [name="${name}"]`, value);
}

const stepDone = (page: Page, step: string) => page.getAttribute(`[data-testid="start-step-${step}"]`, "data-done");

describe("a group's own lab from the first start", () => {
  it("sets up with the code, lands in an empty lab, invites, and goes from tip to an uploaded spectrum", async () => {
    const context = await browser.newContext({ viewport: { width: 1360, height: 900 } });
    const page = await context.newPage();

    // The sign-in page of a new installation leads to setup.
    await page.goto(`${URL_}/sign-in`);
    await shot(page, "sign-in-new-installation");
    await page.click('[data-testid="setup-link"] a');
    await page.waitForURL("**/setup");
    await shot(page, "setup");

    // A wrong code is refused on the page; the right one sets up.
    const owner = { name: "Adaeze Okafor", email: "adaeze@okafor-lab.example", password: "tunnelling-2026" };
    await fill(page, "setup-form", {
      code: "AAAA-BBBB-CCCC-DDDD",
      name: "Okafor Nanoscale Transport Group",
      slug: "okafor-group",
      defaultTipWorkFunction_eV: "4.55",
      defaultSampleWorkFunction_eV: "4.1",
      ownerName: owner.name,
      email: owner.email,
      password: owner.password,
    });
    await page.click('[data-testid="setup-form"] button[type="submit"]');
    await page.waitForSelector("text=That setup code is not valid");
    await fill(page, "setup-form", { code, password: owner.password });
    await page.click('[data-testid="setup-form"] button[type="submit"]');
    await page.waitForURL("**/labs/okafor-group");

    // Signed in as the owner, in an empty lab that says what to do first.
    expect(await page.textContent('[data-testid="current-role"]')).toContain("Owner");
    await page.waitForSelector('[data-testid="getting-started"]');
    for (const step of ["tip", "sample", "session", "upload"]) expect(await stepDone(page, step)).toBe("false");
    await shot(page, "empty-lab");

    // Setup is closed now: a real 404 status, and no link on the sign-in page.
    expect((await fetch(`${URL_}/setup`)).status).toBe(404);
    const signInHtml = await (await fetch(`${URL_}/sign-in`)).text();
    expect(signInHtml).not.toContain('data-testid="setup-link"');

    // Invite a member: the mail is in the outbox.
    const member = `kofi-${Date.now()}@okafor-lab.example`;
    await page.goto(`${URL_}/labs/okafor-group/settings`);
    await fill(page, "invite-form", { email: member });
    await page.selectOption('[data-testid="invite-form"] select[name="role"]', "microscopist");
    await page.click('[data-testid="invite-form"] button[type="submit"]');
    await page.waitForSelector("text=Invitation sent.");
    const mails = await mailsTo(member);
    expect(mails).toHaveLength(1);
    expect(linkIn(mails[0].text, "/invite/")).toContain(`${URL_}/invite/bxi_`);

    // A tip, with the lab's default work function from setup.
    await page.goto(`${URL_}/labs/okafor-group`);
    await page.click('[data-testid="start-step-tip"] a');
    await page.waitForSelector('[data-testid="tip-form"]');
    expect(await page.inputValue('[data-testid="tip-form"] [name="workFunction_eV"]')).toBe("4.55");
    await fill(page, "tip-form", { label: "W-01", material: "W (etched)" });
    await page.click('button:has-text("Create tip")');
    await page.waitForURL("**/labs/okafor-group/tips");
    expect(await stepDone(page, "tip")).toBe("true");

    // A sample, with the sample default from setup.
    await page.click('[data-testid="start-step-sample"] a');
    await page.waitForSelector('[data-testid="sample-form"]');
    expect(await page.inputValue('[data-testid="sample-form"] [name="workFunction_eV"]')).toBe("4.1");
    await fill(page, "sample-form", { name: "OK-01 monolayer", material: "stanene (monolayer)" });
    await page.click('button:has-text("Create sample")');
    await page.waitForSelector("h1:has-text('OK-01 monolayer')");

    // A session joining them.
    await page.goto(`${URL_}/labs/okafor-group/sessions`);
    expect(await stepDone(page, "sample")).toBe("true");
    await shot(page, "first-steps-two-done");
    await page.click('[data-testid="start-step-session"] a');
    await page.waitForSelector('[data-testid="session-form"]');
    await fill(page, "session-form", { label: "first approach", date: "2026-12-01" });
    await page.selectOption('[data-testid="session-form"] select[name="sampleId"]', { label: "OK-01 monolayer" });
    await page.selectOption('[data-testid="session-form"] select[name="tipId"]', { label: "W-01" });
    await page.click('button:has-text("Create session")');
    await page.waitForURL(/\/sessions\/[0-9a-f-]{36}$/);

    // A spectrum dropped on the session page is stored and processed by the worker.
    const csv = spectrumToCsv(makeSpectrum({ vbEdge_V: -0.15, cbEdge_V: 0.15, seed: 5 }));
    await page.waitForSelector('[data-testid="dropzone"]');
    const dt = await page.evaluateHandle((text) => {
      const d = new DataTransfer();
      d.items.add(new File([text], "first-approach-001.csv", { type: "text/csv" }));
      return d;
    }, csv);
    await page.dispatchEvent('[data-testid="dropzone"]', "dragover", { dataTransfer: dt });
    await page.dispatchEvent('[data-testid="dropzone"]', "drop", { dataTransfer: dt });
    await page.waitForSelector('[data-testid="upload-row"][data-status="done"]', { timeout: 45_000 });

    // Every step done: the lab's home no longer lists them.
    await page.goto(`${URL_}/labs/okafor-group`);
    await page.waitForSelector("text=OK-01 monolayer");
    expect(await page.$('[data-testid="getting-started"]')).toBeNull();
    await context.close();
  }, 150_000);

  it("starts a second lab from the lab switcher, which then lists both", async () => {
    const context = await browser.newContext({ viewport: { width: 1360, height: 900 } });
    const page = await context.newPage();
    await page.goto(`${URL_}/sign-in`);
    await fill(page, "sign-in-form", { email: "adaeze@okafor-lab.example", password: "tunnelling-2026" });
    await page.click('[data-testid="sign-in-submit"]');
    await page.waitForURL("**/labs/okafor-group");
    await page.click('[data-testid="lab-switcher"] summary');
    await page.click("text=+ New lab");
    await page.waitForSelector('[data-testid="new-lab-form"]');
    await fill(page, "new-lab-form", { name: "Okafor Teaching Lab", defaultSampleWorkFunction_eV: "5.1" });
    await page.click('button:has-text("Create lab")');
    await page.waitForURL("**/labs/okafor-teaching-lab");
    await page.waitForSelector('[data-testid="getting-started"]');
    await page.click('[data-testid="lab-switcher"] summary');
    const names = await page.$$eval('[data-testid="lab-switcher"] li a[href^="/labs/"]', (as) =>
      as.map((a) => a.textContent?.trim()),
    );
    expect(names).toEqual(["Okafor Nanoscale Transport Group", "✓ Okafor Teaching Lab", "+ New lab"]);
    await shot(page, "lab-switcher");
    await page.goto(`${URL_}/labs/okafor-teaching-lab/samples/new`);
    expect(await page.inputValue('[data-testid="sample-form"] [name="workFunction_eV"]')).toBe("5.1");
    await context.close();
  }, 60_000);
});
