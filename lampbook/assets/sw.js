// @ts-check
// lampbook service worker: precaches the whole handbook so it opens and computes offline.
// The file list, the version, the digests of the engine's files and the engine's own digest are written at build time;
// a new build gets a new cache as a whole.
const PRECACHE = /*LAMPBOOK_PRECACHE*/null;
/** @type {{version: string, files: string[], digests: Record<string, string>, engine: string | null}} */
const manifest = /** @type {any} */ (PRECACHE);
/** this script's global scope (the WebWorker library types `self` as any worker's) */
const sw = /** @type {ServiceWorkerGlobalScope} */ (/** @type {unknown} */ (self));
const CACHE = "lampbook-" + manifest.version;
const STAGED = "lampbook-staged"; // the engine's own downloads, handed over by its worker
// the started engine's memory snapshot, kept on the device by its worker (worker.js), for this build's engine only
const SNAPSHOT = manifest.engine ? "lampbook-snapshot-" + manifest.engine : null;
const scope = sw.registration.scope;

/** @param {Response} response */
async function sha256(response) {
  const digest = await crypto.subtle.digest("SHA-256", await response.arrayBuffer());
  return Array.from(new Uint8Array(digest), (b) => b.toString(16).padStart(2, "0")).join("");
}

// An engine file already downloaded (by the engine on this visit, or kept by an earlier build)
// is taken over when its digest is this build's; anything else is fetched, revalidating
// against the server so a new build never stores an old file under its new name
// (an unchanged file costs a 304, not a second download).
/** @param {Cache} cache */
async function precache(cache) {
  const fetchList = [];
  for (const f of manifest.files) {
    const url = new URL(f, scope).href;
    const want = manifest.digests[f];
    const have = want && (await caches.match(url));
    if (have && (await sha256(have.clone())) === want) await cache.put(url, have);
    else fetchList.push(new Request(url, { cache: "no-cache" }));
  }
  await cache.addAll(fetchList);
}

sw.addEventListener("install", (event) => {
  event.waitUntil(
    caches.open(CACHE)
      .then(precache)
      .then(() => caches.delete(STAGED))
      .then(() => sw.skipWaiting()),
  );
});

sw.addEventListener("activate", (event) => {
  event.waitUntil(
    caches.keys()
      .then((keys) => Promise.all(keys.filter((k) => k.startsWith("lampbook-") && k !== CACHE && k !== SNAPSHOT).map((k) => caches.delete(k))))
      .then(() => sw.clients.claim()),
  );
});

/** @param {Request} request */
async function fromCache(request) {
  const cache = await caches.open(CACHE);
  const url = new URL(request.url);
  url.hash = "";
  url.search = "";
  let hit = await cache.match(url.href);
  if (!hit && url.pathname.endsWith("/")) hit = await cache.match(url.href + "index.html");
  return hit;
}

sw.addEventListener("fetch", (event) => {
  const req = event.request;
  if (req.method !== "GET" || new URL(req.url).origin !== sw.location.origin) return;
  event.respondWith(
    fromCache(req).then(async (hit) => {
      if (hit) return hit;
      try {
        return await fetch(req);
      } catch (e) {
        if (req.mode !== "navigate") throw e;
        // the offline page is precached with everything else; were it missing, a plain network error
        // (what the browser makes of an empty answer) rather than a rejected respondWith
        return (await (await caches.open(CACHE)).match(new URL("offline.html", scope).href)) ?? Response.error();
      }
    }),
  );
});

sw.addEventListener("message", (event) => {
  if (event.data === "version" && event.source) event.source.postMessage({ type: "version", version: manifest.version });
});
