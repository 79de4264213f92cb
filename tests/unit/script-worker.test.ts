import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { builtScripts } from "@/lib/web/built-scripts";
import { SCRIPT_CACHE_PREFIX, scriptCacheName, scriptWorkerSource } from "@/lib/web/script-worker";

const ORIGIN = "https://bandcross.test";
const PLOTLY = "/vendor/plotly-3.1.0-0123456789.min.js";
const CHUNK = "/_next/static/chunks/app/page-abc123.js";

type Handler = (event: Record<string, unknown>) => void;

/**
 * The worker's text run in a stand-in for a service-worker global: event listeners, a Cache
 * Storage of plain maps, and a network that answers from a table (and counts what it was asked).
 */
function bootWorker(scripts: string[], { network = new Map<string, string>(), withRoutes = true } = {}) {
  const handlers = new Map<string, Handler>();
  const storage = new Map<string, Map<string, Response>>();
  const fetched: string[] = [];
  const routes: unknown[] = [];
  let skipped = false;
  const fetchFn = async (input: string | Request) => {
    const url = new URL(typeof input === "string" ? input : input.url, ORIGIN);
    fetched.push(url.pathname);
    const body = network.get(url.pathname);
    return body === undefined ? new Response("missing", { status: 404 }) : new Response(body);
  };
  const openCache = async (name: string) => {
    if (!storage.has(name)) storage.set(name, new Map());
    const entries = storage.get(name)!;
    return {
      add: async (p: string) => {
        const res = await fetchFn(p);
        if (!res.ok) throw new TypeError(`${p}: ${res.status}`);
        entries.set(p, res);
      },
      match: async (p: string) => entries.get(p)?.clone(),
    };
  };
  const caches = {
    open: openCache,
    keys: async () => [...storage.keys()],
    delete: async (name: string) => storage.delete(name),
  };
  const self = {
    location: new URL(`${ORIGIN}/sw.js`),
    addEventListener: (type: string, h: Handler) => handlers.set(type, h),
    skipWaiting: async () => {
      skipped = true;
    },
  };
  new Function("self", "caches", "fetch", scriptWorkerSource({ scripts }))(self, caches, fetchFn);

  async function lifecycle(type: "install" | "activate") {
    const waits: Promise<unknown>[] = [];
    const event: Record<string, unknown> = { waitUntil: (p: Promise<unknown>) => waits.push(p) };
    if (withRoutes && type === "install") event.addRoutes = async (r: unknown[]) => void routes.push(...r);
    handlers.get(type)!(event);
    await Promise.all(waits);
  }
  /** A page's request: the worker's answer, or null when it leaves the request to the network. */
  async function request(url: string, method = "GET"): Promise<Response | null> {
    let answer: Promise<Response> | null = null;
    handlers.get("fetch")!({ request: new Request(new URL(url, ORIGIN), { method }), respondWith: (p: Promise<Response>) => (answer = p) });
    return answer;
  }
  return { storage, fetched, routes, lifecycle, request, skipped: () => skipped };
}

describe("script worker", () => {
  const scripts = [PLOTLY, CHUNK];
  const network = new Map([
    [PLOTLY, "var Plotly={}"],
    [CHUNK, "self.chunk=1"],
  ]);

  it("caches every listed script while it installs and takes over at once", async () => {
    const w = bootWorker(scripts, { network });
    await w.lifecycle("install");
    expect([...w.storage.keys()]).toEqual([scriptCacheName(scripts)]);
    expect([...w.storage.get(scriptCacheName(scripts))!.keys()].sort()).toEqual([...scripts].sort());
    expect(w.skipped()).toBe(true);
    // Static routes: only the folders of listed scripts wake the worker; the rest goes to the network.
    expect(w.routes).toEqual([
      { condition: { urlPattern: "/_next/static/chunks/app/*" }, source: "fetch-event" },
      { condition: { urlPattern: "/vendor/*" }, source: "fetch-event" },
      { condition: { urlPattern: "/*" }, source: "network" },
    ]);
  });

  it("serves listed scripts from its cache and leaves every other request alone", async () => {
    const w = bootWorker(scripts, { network });
    await w.lifecycle("install");
    w.fetched.length = 0;
    const hit = await w.request(PLOTLY);
    expect(await hit!.text()).toBe("var Plotly={}");
    expect(w.fetched).toEqual([]); // from the cache, not the network
    expect(await w.request("/labs/demo/samples/1")).toBeNull();
    expect(await w.request("/api/v1/samples/1/phase")).toBeNull();
    expect(await w.request("/_next/static/chunks/app/other-999.js")).toBeNull(); // not in this build's list
    expect(await w.request(PLOTLY, "POST")).toBeNull();
    expect(await w.request(`https://elsewhere.test${PLOTLY}`)).toBeNull();
  });

  it("fetches a script it could not cache at install from the network when asked", async () => {
    const flaky = new Map([[PLOTLY, "var Plotly={}"]]);
    const w = bootWorker(scripts, { network: flaky });
    await w.lifecycle("install"); // the chunk answers 404 now: the install still completes
    expect(w.skipped()).toBe(true);
    expect([...w.storage.get(scriptCacheName(scripts))!.keys()]).toEqual([PLOTLY]);
    flaky.set(CHUNK, "self.chunk=1");
    w.fetched.length = 0;
    expect(await (await w.request(CHUNK))!.text()).toBe("self.chunk=1");
    expect(w.fetched).toEqual([CHUNK]);
  });

  it("installs where the browser has no static routes", async () => {
    const w = bootWorker(scripts, { network, withRoutes: false });
    await w.lifecycle("install");
    expect(w.routes).toEqual([]);
    expect(await (await w.request(CHUNK))!.text()).toBe("self.chunk=1");
  });

  it("drops the caches of earlier builds when it activates, and nobody else's", async () => {
    const w = bootWorker(scripts, { network });
    w.storage.set(`${SCRIPT_CACHE_PREFIX}00000000`, new Map());
    w.storage.set("someone-else", new Map());
    await w.lifecycle("install");
    await w.lifecycle("activate");
    expect([...w.storage.keys()].sort()).toEqual([scriptCacheName(scripts), "someone-else"].sort());
  });

  it("names its cache by the list: a new build gets a new cache, order does not matter", () => {
    expect(scriptCacheName([CHUNK, PLOTLY])).toBe(scriptCacheName([PLOTLY, CHUNK]));
    expect(scriptCacheName([PLOTLY])).not.toBe(scriptCacheName([PLOTLY, CHUNK]));
    expect(scriptCacheName([PLOTLY])).toMatch(new RegExp(`^${SCRIPT_CACHE_PREFIX}[0-9a-f]{8}$`));
    // FNV-1a 32-bit of the empty string is its offset basis, 0x811c9dc5 (the published constants).
    expect(scriptCacheName([])).toBe(`${SCRIPT_CACHE_PREFIX}811c9dc5`);
    // FNV-1a 32-bit of "a" is 0xe40c292c (the algorithm's published test vectors).
    expect(scriptCacheName(["a"])).toBe(`${SCRIPT_CACHE_PREFIX}e40c292c`);
  });

  it("refuses addresses on another origin", () => {
    expect(() => scriptWorkerSource({ scripts: ["https://cdn.example/x.js"] })).toThrow(/same-origin/);
    expect(() => scriptWorkerSource({ scripts: ["//cdn.example/x.js"] })).toThrow(/same-origin/);
  });
});

describe("builtScripts", () => {
  const root = fs.mkdtempSync(path.join(os.tmpdir(), "bandcross-chunks-"));
  afterAll(() => fs.rmSync(root, { recursive: true, force: true }));

  it("lists a build's JavaScript chunks by the address the browser asks for", () => {
    const chunks = path.join(root, ".next", "static", "chunks");
    fs.mkdirSync(path.join(chunks, "app", "labs"), { recursive: true });
    fs.writeFileSync(path.join(chunks, "main-1a2b.js"), "");
    fs.writeFileSync(path.join(chunks, "app", "labs", "page-3c4d.js"), "");
    fs.writeFileSync(path.join(chunks, "styles-5e6f.css"), "");
    expect(builtScripts(root)).toEqual(["/_next/static/chunks/app/labs/page-3c4d.js", "/_next/static/chunks/main-1a2b.js"]);
  });

  it("lists nothing where there is no build", () => {
    expect(builtScripts(path.join(root, "nowhere"))).toEqual([]);
  });
});
