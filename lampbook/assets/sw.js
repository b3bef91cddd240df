// lampbook service worker: precaches the whole handbook so it opens and computes offline.
// The file list and version are written at build time; a new build gets a new cache as a whole.
const PRECACHE = /*LAMPBOOK_PRECACHE*/null;
const CACHE = "lampbook-" + PRECACHE.version;
const scope = self.registration.scope;

self.addEventListener("install", (event) => {
  event.waitUntil(
    caches.open(CACHE)
      // revalidate against the server so a new build never stores an old file under its new name
      // (an unchanged file costs a 304, not a second download)
      .then((c) => c.addAll(PRECACHE.files.map((f) => new Request(new URL(f, scope).href, { cache: "no-cache" }))))
      .then(() => self.skipWaiting()),
  );
});

self.addEventListener("activate", (event) => {
  event.waitUntil(
    caches.keys()
      .then((keys) => Promise.all(keys.filter((k) => k.startsWith("lampbook-") && k !== CACHE).map((k) => caches.delete(k))))
      .then(() => self.clients.claim()),
  );
});

async function fromCache(request) {
  const cache = await caches.open(CACHE);
  const url = new URL(request.url);
  url.hash = "";
  url.search = "";
  let hit = await cache.match(url.href);
  if (!hit && url.pathname.endsWith("/")) hit = await cache.match(url.href + "index.html");
  return hit;
}

self.addEventListener("fetch", (event) => {
  const req = event.request;
  if (req.method !== "GET" || new URL(req.url).origin !== self.location.origin) return;
  event.respondWith(
    fromCache(req).then(async (hit) => {
      if (hit) return hit;
      try {
        return await fetch(req);
      } catch (e) {
        if (req.mode === "navigate") return (await caches.open(CACHE)).match(new URL("offline.html", scope).href);
        throw e;
      }
    }),
  );
});

self.addEventListener("message", (event) => {
  if (event.data === "version") event.source.postMessage({ type: "version", version: PRECACHE.version });
});
