// Tidewell's service worker. build.py fills in BUILD_ID, PRECACHE and DEFERRED (files of the build with
// their sha256, as build-manifest.json lists them) and SIZES (their bytes); this file in webshell/ is the
// template and is not served as is.
//
// - install: store every file of the build, awaited, so a failed download fails the install and the
//   previous version keeps running. Files whose bytes did not change since an older build already on
//   the device are copied from that build's cache (an update downloads only what changed); the rest
//   are fetched with cache: "no-cache" (revalidated, so what the page has just downloaded comes back as
//   a 304 instead of a second copy). Every stored file is then checked against its sha256; a mismatch
//   (a stale copy from some cache on the way) is fetched again past every cache, then refused.
// - progress: while it stores, the worker tells every window of the site how far it is, in bytes of the
//   build's sizes (SIZES) ("tidewell:stored:<bytes stored>:<bytes in all>"), after each file; the page
//   shows "x MB of y MB stored". Files copied from an older build count as stored at once.
// - later: the files of DEFERRED (the engine's memory snapshot, and the wheel only the benchmark's other
//   install routes use) are not part of the install: a first visit never waits for them. The page posts
//   "tidewell:store-later" once its engine is ready; then each is fetched, checked against its sha256 and
//   stored in this build's cache (an install copies them from an older build when their bytes did not
//   change). An update's new cache starts without the old snapshot, so the old one goes with its cache.
// - activate: delete the caches of older builds (every "tidewell-*" cache but ours), take control;
// - fetch: cache first; navigations get ./index.html; anything not precached goes to the network;
// - a new version waits until the page posts "tidewell:skip-waiting" (the user tapped "Reload").
// Every URL is relative to this script, so the site works under any sub-path.

const BUILD_ID = "__BUILD_ID__";
const CACHE = `tidewell-${BUILD_ID}`;
const PRECACHE = __PRECACHE__;
const DEFERRED = __DEFERRED__;
// url -> bytes of every file of PRECACHE (build.py writes it from the same listing): the progress count
const SIZES = __SIZES__;
const EXPECTED = { ...PRECACHE, ...DEFERRED };

// the build's cache, opened once per service-worker start rather than once per request
let cacheOpened = null;
const opened = () => (cacheOpened ||= caches.open(CACHE));

const hex = (buffer) => Array.from(new Uint8Array(buffer), (b) => b.toString(16).padStart(2, "0")).join("");

async function matches(cache, url) {
  const stored = await cache.match(url);
  if (!stored) return false;
  return hex(await crypto.subtle.digest("SHA-256", await stored.arrayBuffer())) === EXPECTED[url];
}

async function reuseOlderBuilds(cache) {
  const reused = new Set();
  for (const key of await caches.keys()) {
    if (!key.startsWith("tidewell-") || key === CACHE) continue;
    const old = await caches.open(key);
    let manifest;
    try {
      manifest = await (await old.match("./build-manifest.json")).json();
    } catch {
      continue; // not a complete older build
    }
    const hashes = new Map(manifest.files.map((f) => [`./${f.path}`, f.sha256]));
    for (const [url, sha256] of Object.entries(EXPECTED)) {
      if (reused.has(url) || hashes.get(url) !== sha256) continue;
      const copy = await old.match(url);
      if (copy) {
        await cache.put(url, copy);
        reused.add(url);
      }
    }
  }
  return reused;
}

// how far the install is, to every window of the site (controlled or not: a first visit is not)
async function announce(stored, total) {
  try {
    const windows = await self.clients.matchAll({ type: "window", includeUncontrolled: true });
    for (const client of windows) client.postMessage(`tidewell:stored:${stored}:${total}`);
  } catch {
    // a count that cannot be told never stops the install
  }
}

const PARALLEL = 4; // downloads at a time (cache.addAll's parallelism, with a count after each file)

async function precache() {
  const cache = await caches.open(CACHE);
  try {
    const reused = await reuseOlderBuilds(cache);
    const wanted = Object.keys(PRECACHE).filter((url) => !reused.has(url));
    const size = (url) => SIZES[url] || 0;
    const total = Object.keys(PRECACHE).reduce((sum, url) => sum + size(url), 0);
    let stored = [...reused].reduce((sum, url) => sum + (url in PRECACHE ? size(url) : 0), 0);
    await announce(stored, total);
    const queue = [...wanted];
    const next = async () => {
      for (let url = queue.shift(); url !== undefined; url = queue.shift()) {
        const response = await fetch(new Request(url, { cache: "no-cache" }));
        if (!response.ok) throw new Error(`${url}: HTTP ${response.status}`);
        await cache.put(url, response);
        stored += size(url);
        await announce(stored, total);
      }
    };
    await Promise.all(Array.from({ length: PARALLEL }, next));
    for (const url of Object.keys(PRECACHE)) {
      if (await matches(cache, url)) continue;
      await cache.add(new Request(url, { cache: "reload" }));
      if (!(await matches(cache, url))) throw new Error(`${url} is not the file of build ${BUILD_ID}`);
    }
  } catch (err) {
    await caches.delete(CACHE); // nothing half-stored; the next visit tries again
    throw err;
  }
}

// The deferred files, once per service-worker start (each checked; a bad one is dropped, not kept).
let storing = null;
async function storeLater() {
  const cache = await opened();
  for (const [url, sha256] of Object.entries(DEFERRED)) {
    if (await matches(cache, url)) continue;
    const response = await fetch(new Request(url, { cache: "no-cache" }));
    if (!response.ok) continue;
    const body = await response.arrayBuffer();
    if (hex(await crypto.subtle.digest("SHA-256", body)) !== sha256) continue;
    await cache.put(url, new Response(body, { headers: response.headers }));
  }
}

self.addEventListener("install", (event) => {
  event.waitUntil(precache());
});

self.addEventListener("activate", (event) => {
  event.waitUntil(
    (async () => {
      for (const key of await caches.keys()) {
        if (key.startsWith("tidewell-") && key !== CACHE) {
          await caches.delete(key);
        }
      }
      await self.clients.claim();
    })(),
  );
});

self.addEventListener("fetch", (event) => {
  const request = event.request;
  if (request.method !== "GET" || new URL(request.url).origin !== self.location.origin) {
    return;
  }
  event.respondWith(
    (async () => {
      const cache = await opened();
      const key = request.mode === "navigate" ? new URL("./index.html", self.location.href).href : request;
      const hit = await cache.match(key);
      return hit || fetch(request);
    })(),
  );
});

self.addEventListener("message", (event) => {
  if (event.data === "tidewell:store-later") {
    storing ||= storeLater().finally(() => {
      storing = null;
    });
    event.waitUntil(storing.catch(() => {})); // offline now: the next start asks again
  } else if (event.data === "tidewell:skip-waiting") {
    self.skipWaiting();
  } else if (event.data === "tidewell:build-id" && event.source) {
    event.source.postMessage(`tidewell:build-id:${BUILD_ID}`);
  } else if (event.data === "tidewell:resources" && event.source) {
    // what this worker fetched itself (the tests check that nothing left the site's origin)
    const names = performance.getEntriesByType("resource").map((e) => e.name);
    event.source.postMessage(`tidewell:resources:${JSON.stringify(names)}`);
  }
});
