import { like, or } from "drizzle-orm";
import type { Browser } from "playwright-core";
import { afterAll, afterEach, beforeAll, describe, expect, it } from "vitest";
import { closeDb, db } from "@/db/client";
import { memberships, signInThrottle } from "@/db/schema";
import { stopBoss } from "@/lib/jobs/queue";
import { listMembers } from "@/lib/services/members/listMembers";
import { removeMember } from "@/lib/services/members/removeMember";
import { createSession } from "@/lib/services/sessions/createSession";
import { createSample } from "@/lib/services/samples/createSample";
import { createToken } from "@/lib/services/tokens/createToken";
import { processUpload } from "@/lib/services/uploads/processUpload";
import { makeSweep } from "@/lib/spectra";
import { STEP_512, sweepJson } from "../../scripts/bench/web/common";
import { APP_URL, launch, shot, SignInPage, signedIn } from "../support/browser";
import { makeLab, sampleBody, system, TEST_PASSWORD, type LabFixture } from "../support/fixtures";
import { bytesOf, uploadFile } from "../support/pipeline";

/**
 * The holes a probe of the running app found in sign-in, sessions, input and headers, tried from
 * outside as a browser or a script meets them.
 */
let browser: Browser;
let lab: LabFixture;
let ownerToken: string;

/**
 * Sign-in failures from this machine's address are counted per client, and the stranger's on the
 * owner's account: every test starts with none, so one test's refusals never decide another's.
 */
const forgetClientFailures = () =>
  db()
    .delete(signInThrottle)
    .where(or(like(signInThrottle.key, "client:%"), like(signInThrottle.key, `%-${lab.lab.slug.slice(2)}@lab.example`)));

beforeAll(async () => {
  browser = await launch();
  lab = await makeLab("Security");
  ownerToken = (await createToken({ ctx: lab.ctx("owner"), input: { name: "security" } })).token;
  await forgetClientFailures();
});
afterEach(() => forgetClientFailures());
afterAll(async () => {
  await forgetClientFailures().catch(() => {});
  await browser?.close();
  await stopBoss();
  await closeDb();
});

type Outcome = "signed-in" | "invalid" | "throttled";

/**
 * One sign-in as a script does it: Auth.js's CSRF token, then its credentials callback. Its answer
 * is a redirect: to the sign-in page with `error=CredentialsSignin&code=…`, or on, with a session.
 */
async function attempt(email: string, password: string, headers: Record<string, string> = {}): Promise<Outcome> {
  const csrf = await fetch(`${APP_URL}/api/auth/csrf`, { headers });
  const { csrfToken } = (await csrf.json()) as { csrfToken: string };
  const cookie = csrf.headers.getSetCookie().map((c) => c.split(";")[0]).join("; ");
  const res = await fetch(`${APP_URL}/api/auth/callback/credentials`, {
    method: "POST",
    redirect: "manual",
    headers: { ...headers, cookie, "content-type": "application/x-www-form-urlencoded" },
    body: new URLSearchParams({ email, password, csrfToken, callbackUrl: `${APP_URL}/labs` }),
  });
  const location = res.headers.get("location") ?? "";
  if (/code=throttled/.test(location)) return "throttled";
  if (/error=/.test(location)) return "invalid";
  expect(res.headers.getSetCookie().some((c) => c.includes("session-token"))).toBe(true);
  return "signed-in";
}

const api = (path: string, init: RequestInit = {}) => fetch(`${APP_URL}/api/v1${path}`, init);

describe("sign-in throttle", () => {
  it("throttles a client that rotates X-Forwarded-For (the header is not trusted from an unlisted peer)", async () => {
    const tag = Date.now();
    const outcomes: Outcome[] = [];
    // Documentation addresses (RFC 5737), a new one on every try, as a script would forge them.
    for (let i = 0; i < 12; i++) outcomes.push(await attempt(`spray-${tag}-${i}@lab.example`, "not it", { "x-forwarded-for": `198.51.100.${i + 1}` }));
    expect(outcomes).toContain("throttled");
  });

  it("a stranger's wrong passwords do not keep the owner out of her own browser", async () => {
    const owner = lab.people.owner;
    // The owner's browser, where she has signed in before.
    const { context, page } = await signedIn(browser, owner.email, TEST_PASSWORD, lab.lab.slug);
    await page.click('button:has-text("Sign out")');
    await page.waitForURL("**/sign-in");
    // A stranger hammers her account from elsewhere (more than the old hard lock's 8 tries).
    const stranger: Outcome[] = [];
    for (let i = 0; i < 14; i++) stranger.push(await attempt(owner.email, `guess ${i}`));
    expect(stranger).not.toContain("signed-in");
    expect(stranger).toContain("throttled");
    // She signs in at once.
    await new SignInPage(page).signIn(owner.email, TEST_PASSWORD);
    await page.waitForURL(`**/labs/${lab.lab.slug}`, { timeout: 15_000 });
    await context.close();
    // From a browser new to the account she may have to wait, but seconds (at most a minute), not
    // the old 15 minutes: each refusal says how long, and the try after that wait gets in.
    // The stranger keeps guessing, as fast as he is let: 8 failures in a row (a 4 s wait after the
    // last, lib/auth/throttle.ts), the old lock's count.
    for (let failures = 0; failures < 8; ) {
      if ((await attempt(owner.email, `more guesses ${failures}`)) === "invalid") failures++;
      else await new Promise((r) => setTimeout(r, 500));
    }
    const fresh = await browser.newContext();
    const elsewhere = await fresh.newPage();
    const form = new SignInPage(elsewhere);
    await form.open();
    const t0 = Date.now();
    let waits = 0;
    for (;;) {
      await form.signIn(owner.email, TEST_PASSWORD);
      const landed = await elsewhere.waitForURL(`**/labs/${lab.lab.slug}`, { timeout: 3_000 }).then(() => true, () => false);
      if (landed) break;
      const notice = (await elsewhere.locator("text=Too many failed attempts").textContent()) ?? "";
      const seconds = Number(/Try again in (\d+) seconds?\./.exec(notice)?.[1]);
      expect(seconds).toBeGreaterThan(0);
      expect(seconds).toBeLessThanOrEqual(60);
      if (waits++ === 0) await shot(elsewhere, "sign-in-throttled");
      await elsewhere.waitForTimeout(seconds * 1000);
    }
    expect(waits).toBeGreaterThan(0);
    expect(Date.now() - t0).toBeLessThan(75_000);
    await fresh.close();
  });
});

describe("sessions end on the server", () => {
  it("a session cookie kept after signing out is refused: 401 from the API, the sign-in page for pages", async () => {
    const { context, page } = await signedIn(browser, lab.people.analyst.email, TEST_PASSWORD, lab.lab.slug);
    const cookies = await context.cookies();
    const cookie = cookies.map((c) => `${c.name}=${c.value}`).join("; ");
    expect((await api(`/me?lab=${lab.lab.slug}`, { headers: { cookie } })).status).toBe(200);
    await page.click('button:has-text("Sign out")');
    await page.waitForURL("**/sign-in");
    expect((await api(`/me?lab=${lab.lab.slug}`, { headers: { cookie } })).status).toBe(401);
    const replay = await browser.newContext();
    await replay.addCookies(cookies);
    const again = await replay.newPage();
    await again.goto(`${APP_URL}/labs/${lab.lab.slug}`);
    await again.waitForURL("**/sign-in**");
    await replay.close();
    await context.close();
  });

  it("removal from a lab ends the member's sessions, in every lab", async () => {
    const other = await makeLab("Security other");
    // The analyst of `other` is also a member of a second lab, the one she is removed from.
    const person = other.people.analyst;
    await db().insert(memberships).values({ labId: lab.lab.id, userId: person.id, role: "analyst" });
    // With two labs she lands on the list of her labs.
    const context = await browser.newContext();
    const page = await context.newPage();
    await new SignInPage(page).open();
    await new SignInPage(page).signIn(person.email, TEST_PASSWORD);
    await page.waitForURL("**/labs");
    const cookie = (await context.cookies()).map((c) => `${c.name}=${c.value}`).join("; ");
    expect((await api(`/me?lab=${other.lab.slug}`, { headers: { cookie } })).status).toBe(200);
    const id = (await listMembers({ ctx: lab.ctx("owner") })).members.find((m) => m.userId === person.id)!.id;
    await removeMember({ ctx: lab.ctx("owner"), input: { membershipId: id } });
    expect((await api(`/me?lab=${other.lab.slug}`, { headers: { cookie } })).status).toBe(401);
    await context.close();
  });
});

describe("bad input is a clear 4xx, not a 500", () => {
  it("a NUL character in a name or a note is a 422 naming the field, and nothing is stored", async () => {
    const headers = { authorization: `Bearer ${ownerToken}`, "content-type": "application/json" };
    const res = await api("/samples", { method: "POST", headers, body: JSON.stringify(sampleBody("GX\u0000-NUL")) });
    expect(res.status).toBe(422);
    expect(Object.keys(((await res.json()) as { error: { fields: Record<string, string[]> } }).error.fields)).toEqual(["name"]);
    const list = (await (await api("/samples", { headers })).json()) as { samples?: { name: string }[] } | { name: string }[];
    expect(JSON.stringify(list)).not.toContain("GX");
    const sample = await createSample({ ctx: lab.ctx("owner"), input: sampleBody() });
    const patch = await api(`/samples/${sample.id}`, { method: "PATCH", headers, body: JSON.stringify({ notes: "annealed\u0000 at 450 K" }) });
    expect(patch.status).toBe(422);
    expect(Object.keys(((await patch.json()) as { error: { fields: Record<string, string[]> } }).error.fields)).toEqual(["notes"]);
  });

  it("a malformed percent-encoding in a path is a 400", async () => {
    const headers = { authorization: `Bearer ${ownerToken}` };
    // "%E0%A4%A" is a truncated three-byte UTF-8 sequence (RFC 3629; RFC 3986 §2.1 percent-encoding).
    const res = await fetch(`${APP_URL}/api/v1/samples/%E0%A4%A`, { headers });
    expect(res.status).toBe(400);
    const page = await fetch(`${APP_URL}/labs/${lab.lab.slug}/samples/%E0%A4%A`, { redirect: "manual" });
    expect(page.status).toBe(400);
  });
});

describe("headers", () => {
  it("pages carry a Content-Security-Policy and a Permissions-Policy, and the phase plot draws with no violation", async () => {
    // A sweep large enough for WebGL markers (WEBGL_FROM, 1,500 points): one file of 1,600 spectra.
    const owner = lab.ctx("owner");
    const sampleId = (await createSample({ ctx: owner, input: sampleBody("GX-CSP webgl") })).id;
    const sessionId = (await createSession({ ctx: owner, input: { sampleId, label: "csp", date: "2026-11-30", temperature_K: 4.5 } })).id;
    const sweep = makeSweep({ n: 1600, seed: 4242, step_V: STEP_512, noise: 0.02 });
    const { id } = await uploadFile(owner, sessionId, "csp-sweep.json", bytesOf(sweepJson(sweep.spectra, () => "terrace A")));
    await processUpload({ ctx: system(), input: { uploadId: id } });

    const { context, page } = await signedIn(browser, lab.people.microscopist.email, TEST_PASSWORD, lab.lab.slug);
    const violations: string[] = [];
    page.on("console", (m) => {
      if (/Content.Security.Policy|Permissions.Policy/i.test(m.text())) violations.push(m.text());
    });
    await page.addInitScript(() => {
      document.addEventListener("securitypolicyviolation", (e) =>
        console.error(`Content-Security-Policy violation: ${e.violatedDirective} ${e.blockedURI} at ${e.sourceFile}:${e.lineNumber}:${e.columnNumber} ${e.sample}`),
      );
    });
    const res = await page.goto(`${APP_URL}/labs/${lab.lab.slug}/samples/${sampleId}`);
    const csp = res?.headers()["content-security-policy"] ?? "";
    // A nonce for Next's scripts, and no inline script or eval allowed otherwise.
    expect(csp).toMatch(/script-src [^;]*'nonce-[A-Za-z0-9+/=_-]{16,}'/);
    expect(csp).not.toMatch(/script-src [^;]*'unsafe-(inline|eval)'/);
    expect(csp).toMatch(/frame-ancestors 'none'/);
    expect(csp).toMatch(/object-src 'none'/);
    expect(res?.headers()["permissions-policy"] ?? "").toMatch(/camera=\(\)/);
    await page.locator('[data-testid="phase-plot"] .js-plotly-plot .main-svg').first().waitFor({ timeout: 30_000 });
    expect(await page.locator('[data-testid="phase-plot"] canvas').count()).toBeGreaterThan(0);
    await page.waitForTimeout(500);
    await shot(page, "csp-phase-plot-webgl");
    expect(violations).toEqual([]);
    // Every page gets its own nonce.
    const again = await fetch(`${APP_URL}/sign-in`);
    const other = again.headers.get("content-security-policy") ?? "";
    expect(other).toMatch(/'nonce-/);
    expect(other.match(/'nonce-([^']+)'/)?.[1]).not.toBe(csp.match(/'nonce-([^']+)'/)?.[1]);
    await context.close();
  });
});
