/**
 * Browser tests drive Debian's chromium through playwright-core (no browser download). The app is
 * built and served by `npm test` at APP_URL.
 */
import fs from "node:fs";
import path from "node:path";
import { chromium, type Browser, type BrowserContext, type BrowserContextOptions, type Page } from "playwright-core";

export const APP_URL = process.env.APP_URL ?? "http://localhost:3100";
export const SHOTS_DIR = path.resolve("test-results/screenshots");

/** `extraArgs`: more chromium switches, e.g. `--host-resolver-rules=MAP name 127.0.0.1` to reach the app by another name. */
export async function launch(extraArgs: string[] = []): Promise<Browser> {
  return chromium.launch({
    executablePath: process.env.CHROMIUM_PATH ?? "/usr/bin/chromium",
    args: ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking", "--disable-component-update", "--disable-sync", "--disable-dev-shm-usage", ...extraArgs],
  });
}

export async function shot(page: Page, name: string): Promise<string> {
  fs.mkdirSync(SHOTS_DIR, { recursive: true });
  const file = path.join(SHOTS_DIR, `${name}.png`);
  await page.screenshot({ path: file, fullPage: true });
  return file;
}

/** Page object for the sign-in screen. */
export class SignInPage {
  constructor(private readonly page: Page) {}
  /** `base`: the origin to open it at (the app answers under any trusted host name). */
  async open(base = APP_URL) {
    await this.page.goto(`${base}/sign-in`);
  }
  async signIn(email: string, password: string) {
    // A previous attempt's answer resets the form when React commits it (React 19 form actions),
    // which can land after its response: typed values would be wiped and the submit refused as
    // incomplete. The button is enabled again only in that same commit.
    await this.page.waitForSelector('[data-testid="sign-in-submit"]:enabled');
    await this.page.fill('[data-testid="sign-in-form"] input[name="email"]', email);
    await this.page.fill('[data-testid="sign-in-form"] input[name="password"]', password);
    // Wait for the server action's answer, so a following attempt never races the previous one.
    await Promise.all([this.page.waitForResponse((r) => r.request().method() === "POST" && r.url().includes("/sign-in")), this.page.click('[data-testid="sign-in-submit"]')]);
  }
}

/** A fresh browser context signed in as `email` (the fixtures' password), landed on the lab's home. */
export async function signedIn(
  browser: Browser,
  email: string,
  password: string,
  labSlug: string,
  viewport = { width: 1360, height: 900 },
  { serviceWorkers = "allow", ...more }: { serviceWorkers?: "allow" | "block" } & Pick<BrowserContextOptions, "hasTouch" | "isMobile"> = {},
): Promise<{ context: BrowserContext; page: Page }> {
  const context = await browser.newContext({ viewport, acceptDownloads: true, serviceWorkers, ...more });
  const page = await context.newPage();
  const s = new SignInPage(page);
  await s.open();
  await s.signIn(email, password);
  await page.waitForURL(`**/labs/${labSlug}`);
  return { context, page };
}
