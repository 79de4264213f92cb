import type { Browser } from "playwright-core";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb } from "@/db/client";
import { inviteMember } from "@/lib/services/members/inviteMember";
import { APP_URL, launch, shot, SignInPage } from "../support/browser";
import { makeLab, TEST_PASSWORD, type LabFixture } from "../support/fixtures";
import { linkIn, mailsTo } from "../support/outbox";

let browser: Browser;
let lab: LabFixture;

beforeAll(async () => {
  browser = await launch();
  lab = await makeLab("Hosts");
});
afterAll(async () => {
  await browser?.close();
  await closeDb();
});

/** The same server under its other local name: APP_URL says localhost, this says 127.0.0.1. */
const loopback = (() => {
  const url = new URL(APP_URL);
  url.hostname = url.hostname === "localhost" ? "127.0.0.1" : "localhost";
  return url.origin;
})();

describe("sign-in under another host name", () => {
  it("signs in at the loopback address and stays on it, signed in, and signs out there too", async () => {
    const context = await browser.newContext({ viewport: { width: 1360, height: 860 } });
    const page = await context.newPage();
    const signIn = new SignInPage(page);
    await signIn.open(loopback);
    await signIn.signIn(lab.people.analyst.email, TEST_PASSWORD);
    await page.waitForURL(`${loopback}/labs/${lab.lab.slug}`, { timeout: 15_000 });
    expect(new URL(page.url()).host).toBe(new URL(loopback).host);
    expect(await page.textContent('[data-testid="current-role"]')).toContain("Analyst");
    await shot(page, "sign-in-host-loopback-lab");
    // Reloading keeps the session: the cookie belongs to the host the user signed in at.
    await page.reload();
    await page.waitForSelector('[data-testid="current-role"]');
    await page.click('button:has-text("Sign out")');
    await page.waitForURL(`${loopback}/sign-in`);
    await page.goto(`${loopback}/labs/${lab.lab.slug}`);
    await page.waitForURL(`${loopback}/sign-in**`);
    await context.close();
  });

  it("accepting an invitation opened at the loopback address signs the new member in there", async () => {
    const email = `loopback-${Date.now()}@lab.example`;
    await inviteMember({ ctx: lab.ctx("owner"), input: { email, role: "microscopist" } });
    const [mail] = await mailsTo(email);
    const link = new URL(linkIn(mail.text, "/invite/"));
    const context = await browser.newContext({ viewport: { width: 1360, height: 860 } });
    const page = await context.newPage();
    await page.goto(`${loopback}${link.pathname}`);
    await page.fill('[data-testid="accept-invite-form"] input[name="name"]', "Loopback Person");
    await page.fill('[data-testid="accept-invite-form"] input[name="password"]', "a long new password");
    await page.click('[data-testid="accept-invite-form"] button[type="submit"]');
    await page.waitForURL(`${loopback}/labs/${lab.lab.slug}`, { timeout: 15_000 });
    expect(await page.textContent('[data-testid="current-role"]')).toContain("Microscopist");
    await context.close();
  });

  it("refuses a host name that is not trusted, says why, and gives no session there", async () => {
    // A name the lab never configured that leads to this server (a look-alike or rebinding domain).
    const untrusted = new URL(APP_URL);
    untrusted.hostname = "lab.untrusted.example";
    const other = await launch([`--host-resolver-rules=MAP lab.untrusted.example 127.0.0.1`]);
    try {
      const context = await other.newContext({ viewport: { width: 1360, height: 860 } });
      const page = await context.newPage();
      const signIn = new SignInPage(page);
      await signIn.open(untrusted.origin);
      const notice = page.locator('[data-testid="untrusted-host"]');
      await notice.waitFor();
      expect(await notice.textContent()).toContain(untrusted.host);
      await shot(page, "sign-in-host-untrusted");
      await signIn.signIn(lab.people.analyst.email, TEST_PASSWORD);
      await page.waitForSelector('[data-testid="sign-in-form"] >> text=not one of the addresses');
      expect(page.url()).toBe(`${untrusted.origin}/sign-in`);
      expect((await context.cookies()).some((c) => c.name.includes("session-token"))).toBe(false);
    } finally {
      await other.close();
    }
  });
});
