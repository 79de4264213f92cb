import type { Browser, BrowserContext, Page } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb } from "@/db/client";
import { createSample } from "@/lib/services/samples/createSample";
import { APP_URL, launch, shot, SignInPage, signedIn as signedInAs } from "../support/browser";
import { makeLab, sampleBody, TEST_PASSWORD, type LabFixture } from "../support/fixtures";

let browser: Browser;
let lab: LabFixture;
let sampleId: string;

beforeAll(async () => {
  browser = await launch();
  lab = await makeLab("Browser");
  sampleId = (await createSample({ ctx: lab.ctx("owner"), input: { ...sampleBody("GX-01 bilayer"), substrate: "MoS2" } })).id;
});
afterAll(async () => {
  await browser?.close();
  await closeDb();
});

const signedIn = (email: string) => signedInAs(browser, email, TEST_PASSWORD, lab.lab.slug, { width: 1360, height: 860 });

describe("sign-in", () => {
  it("shows one message for a wrong password and lets the right one in", async () => {
    const context = await browser.newContext({ viewport: { width: 1360, height: 860 } });
    const page = await context.newPage();
    const signIn = new SignInPage(page);
    await signIn.open();
    await shot(page, "sign-in");
    await signIn.signIn(lab.people.owner.email, "wrong password");
    await page.waitForSelector("text=That e-mail and password do not match an account.");
    await signIn.signIn("nobody@nowhere.example", "wrong password");
    await page.waitForSelector("text=That e-mail and password do not match an account.");
    await signIn.signIn(lab.people.owner.email, TEST_PASSWORD);
    await page.waitForURL(`**/labs/${lab.lab.slug}`);
    expect(await page.textContent('[data-testid="current-role"]')).toContain("Owner");
    await context.close();
  });

  it("sends a visitor who is not signed in to the sign-in page", async () => {
    const context = await browser.newContext();
    const page = await context.newPage();
    await page.goto(`${APP_URL}/labs/${lab.lab.slug}`);
    await page.waitForURL("**/sign-in**");
    expect(new URL(page.url()).pathname).toBe("/sign-in");
    expect(await page.textContent("h1")).toBe("Sign in to Bandcross");
    // Nothing of the lab reached the visitor: not its name, not its samples.
    const text = (await page.textContent("body")) ?? "";
    expect(text).not.toContain(lab.lab.name);
    expect(text).not.toContain("GX-01 bilayer");
    // The same refusal without a browser: the API answers 401 to a request with no session or token.
    const api = await fetch(`${APP_URL}/api/v1/samples?lab=${lab.lab.slug}`);
    expect(api.status).toBe(401);
    await context.close();
  });
});

describe("lab home and forms", () => {
  it("an owner sees the samples table, sorts and filters it, and creates a sample with field errors first", async () => {
    const { context, page } = await signedIn(lab.people.owner.email);
    await page.waitForSelector('[data-testid="samples-table"] >> text=GX-01 bilayer');
    await shot(page, "lab-home");
    await page.click("text=New sample");
    await page.waitForSelector('[data-testid="sample-form"]');
    await page.fill('input[name="name"]', "GX-02 monolayer");
    await page.fill('input[name="material"]', "germanene");
    await page.fill('input[name="workFunction_eV"]', "12");
    await page.click('button:has-text("Create sample")');
    await page.waitForSelector("text=A work function above 7 eV is not physical");
    await shot(page, "sample-form-errors");
    await page.fill('input[name="workFunction_eV"]', "4,1".replace(",", "."));
    await page.click('button:has-text("Create sample")');
    await page.waitForSelector("h1:has-text('GX-02 monolayer')");
    await page.click("text=Samples");
    await page.waitForSelector('[data-testid="samples-table"] >> text=GX-02 monolayer');
    await page.fill('input[type="search"]', "GX-01");
    await page.waitForSelector('[data-testid="samples-table"] >> text=1 of 2');
    expect(await page.isVisible('[data-testid="samples-table"] >> text=GX-02 monolayer')).toBe(false);
    await context.close();
  });

  it("a duplicate sample name is refused with a clear message and the typed values kept", async () => {
    const { context, page } = await signedIn(lab.people.microscopist.email);
    await page.goto(`${APP_URL}/labs/${lab.lab.slug}/samples/new`);
    await page.fill('input[name="name"]', "GX-01 bilayer");
    await page.fill('input[name="material"]', "germanene");
    await page.click('button:has-text("Create sample")');
    await page.waitForSelector('text=A sample named "GX-01 bilayer" already exists in this lab.');
    expect(await page.inputValue('input[name="material"]')).toBe("germanene");
    await context.close();
  });

  it("a collaborator sees samples but no edit controls, and the settings page is not there for them", async () => {
    const { context, page } = await signedIn(lab.people.collaborator.email);
    await page.waitForSelector('[data-testid="samples-table"]');
    expect(await page.isVisible("text=New sample")).toBe(false);
    expect(await page.isVisible("text=Lab settings")).toBe(false);
    const res = await page.goto(`${APP_URL}/labs/${lab.lab.slug}/settings`);
    expect(res?.status()).toBe(404);
    const res2 = await page.goto(`${APP_URL}/labs/${lab.lab.slug}/samples/new`);
    expect(res2?.status()).toBe(404);
    // The sample page streams its frame before its data; an unknown sample is still a 404 response.
    const res3 = await page.goto(`${APP_URL}/labs/${lab.lab.slug}/samples/00000000-0000-4000-8000-000000000000`);
    expect(res3?.status()).toBe(404);
    // Editing a sample they may see is forbidden to them: the same 404 response as other forbidden pages.
    const res4 = await page.goto(`${APP_URL}/labs/${lab.lab.slug}/samples/${sampleId}/edit`);
    expect(res4?.status()).toBe(404);
    await context.close();
  });

  it("an owner creates and revokes an API token in lab settings; the token is shown once", async () => {
    const { context, page } = await signedIn(lab.people.owner.email);
    await context.grantPermissions(["clipboard-read", "clipboard-write"], { origin: APP_URL });
    await page.click("text=Lab settings");
    await page.waitForSelector('[data-testid="members-table"]');
    // "Acts as" names each member once: the owner as "Me", not a second time under her name.
    const actsAs = await page.$$eval('[data-testid="token-form"] select[name="userId"] option', (os) => os.map((o) => o.textContent ?? ""));
    expect(actsAs[0]).toBe(`Me (${lab.people.owner.name})`);
    expect(actsAs.filter((t) => t.includes(lab.people.owner.name))).toHaveLength(1);
    expect(actsAs).toHaveLength(4);
    await page.fill('[data-testid="token-form"] input[name="name"]', "acquisition PC");
    await page.click('[data-testid="token-form"] button:has-text("Create token")');
    const token = (await page.textContent('[data-testid="new-token"]'))?.trim() ?? "";
    expect(token).toMatch(/^bxt_/);
    await page.click('[data-testid="copy-token"]');
    await page.waitForSelector('[data-testid="copy-token"]:has-text("Copied")');
    expect(await page.evaluate(() => navigator.clipboard.readText())).toBe(token);
    await shot(page, "lab-settings");
    const me = await fetch(`${APP_URL}/api/v1/me`, { headers: { authorization: `Bearer ${token}` } });
    expect(me.status).toBe(200);
    expect(((await me.json()) as { lab: { slug: string } }).lab.slug).toBe(lab.lab.slug);
    await page.reload();
    expect(await page.isVisible('[data-testid="new-token"]')).toBe(false);
    await page.click('[data-testid="tokens-list"] button:has-text("Revoke")');
    await page.waitForSelector('[data-testid="tokens-list"] >> text=revoked');
    const after = await fetch(`${APP_URL}/api/v1/me`, { headers: { authorization: `Bearer ${token}` } });
    expect(after.status).toBe(401);
    await context.close();
  });

  it("is usable on a phone-sized screen", async () => {
    const context = await browser.newContext({ viewport: { width: 390, height: 844 } });
    const page = await context.newPage();
    const s = new SignInPage(page);
    await s.open();
    await s.signIn(lab.people.analyst.email, TEST_PASSWORD);
    await page.waitForURL(`**/labs/${lab.lab.slug}`);
    await page.waitForSelector('[data-testid="samples-table"] >> text=GX-01 bilayer');
    const menu = page.locator('button:has-text("Menu")');
    // The navigation is folded away until asked for, so the samples come first on a small screen.
    expect(await menu.getAttribute("aria-expanded")).toBe("false");
    expect(await page.isVisible("#lab-nav >> text=Sessions")).toBe(false);
    await menu.click();
    await page.waitForSelector("#lab-nav >> text=Sessions");
    expect(await menu.getAttribute("aria-expanded")).toBe("true");
    // Nothing wider than the screen: no sideways scrolling of the whole page.
    const widths = await page.evaluate(() => ({ page: document.documentElement.scrollWidth, screen: window.innerWidth }));
    expect(widths.page).toBeLessThanOrEqual(widths.screen);
    await shot(page, "lab-home-phone");
    await page.click("#lab-nav >> text=Sessions");
    await page.waitForURL(`**/labs/${lab.lab.slug}/sessions`);
    expect(new URL(page.url()).pathname).toBe(`/labs/${lab.lab.slug}/sessions`);
    await context.close();
  });
});
