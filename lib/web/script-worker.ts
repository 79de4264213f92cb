/**
 * Bandcross's service worker: it keeps the app's scripts (the plotting library and the build's
 * JavaScript chunks) compiled in the browser, and does nothing else.
 *
 * Why: a browser compiles a script from its HTTP cache lazily, function by function as the code
 * runs, and keeps compiled code only from a script's second run on. So a browser's first phase
 * plot paid for compiling Plotly's drawing code and the page's code in the middle of the draw
 * (about 0.5 s of a first visit's main thread, traced on a 2-core machine). Scripts that a service
 * worker puts into its cache while it installs are compiled there, all of them, and the compiled
 * code is kept beside the cached copy (Chromium does this; other browsers simply serve the cached
 * file). The worker installs on whatever page of the app is opened first, usually sign-in, so the
 * first sample page finds its scripts compiled.
 *
 * Every listed address is content-keyed (its name changes with its content), so a cached copy is
 * never stale; a new build lists new addresses, which changes the worker's text, and the new worker
 * replaces the old one at once and drops the old copies. Requests for anything else go to the
 * network: without waking the worker where the browser supports static routes, else through a
 * fetch handler that leaves them alone. A script missing from the cache is fetched as usual.
 */
export interface ScriptWorkerInput {
  /** Same-origin paths of immutable scripts to keep, e.g. `/vendor/plotly-….min.js`. */
  scripts: string[];
}

export const SCRIPT_CACHE_PREFIX = "bandcross-scripts:";

/** A name for the cache that changes whenever the list does (FNV-1a of the sorted list). */
export function scriptCacheName(scripts: string[]): string {
  let h = 0x811c9dc5;
  for (const ch of [...scripts].sort().join("\n")) {
    h ^= ch.charCodeAt(0);
    h = Math.imul(h, 0x01000193) >>> 0;
  }
  return `${SCRIPT_CACHE_PREFIX}${h.toString(16).padStart(8, "0")}`;
}

/** Path prefixes under which the worker's fetch handler is asked at all (static routes). */
function routedPrefixes(scripts: string[]): string[] {
  return [...new Set(scripts.map((s) => s.slice(0, s.lastIndexOf("/") + 1)))].sort();
}

export function scriptWorkerSource({ scripts }: ScriptWorkerInput): string {
  for (const s of scripts) {
    if (!s.startsWith("/") || s.startsWith("//")) throw new Error(`not a same-origin path: ${s}`);
  }
  return `// Bandcross: keeps the app's scripts compiled in the browser (lib/web/script-worker.ts).
const SCRIPTS = new Set(${JSON.stringify([...scripts].sort())});
const CACHE = ${JSON.stringify(scriptCacheName(scripts))};
const PREFIX = ${JSON.stringify(SCRIPT_CACHE_PREFIX)};
const ROUTED = ${JSON.stringify(routedPrefixes(scripts))};

self.addEventListener("install", (event) => {
  event.waitUntil(
    (async () => {
      if (event.addRoutes) {
        try {
          await event.addRoutes([
            ...ROUTED.map((p) => ({ condition: { urlPattern: p + "*" }, source: "fetch-event" })),
            { condition: { urlPattern: "/*" }, source: "network" },
          ]);
        } catch {
          // An older form of static routes: the fetch handler below decides alone.
        }
      }
      const cache = await caches.open(CACHE);
      // One by one: a script that cannot be fetched now is fetched from the network when asked for.
      await Promise.all([...SCRIPTS].map((s) => cache.add(s).catch(() => undefined)));
      await self.skipWaiting();
    })(),
  );
});

self.addEventListener("activate", (event) => {
  event.waitUntil(
    (async () => {
      for (const name of await caches.keys()) {
        if (name.startsWith(PREFIX) && name !== CACHE) await caches.delete(name);
      }
    })(),
  );
});

self.addEventListener("fetch", (event) => {
  const url = new URL(event.request.url);
  if (event.request.method !== "GET" || url.origin !== self.location.origin || !SCRIPTS.has(url.pathname)) return;
  event.respondWith(
    (async () => {
      const hit = await (await caches.open(CACHE)).match(url.pathname);
      return hit ?? fetch(event.request);
    })(),
  );
});
`;
}
