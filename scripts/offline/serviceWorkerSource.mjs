// The text of the service worker (sw.js) that makes the built app work offline, for a build whose files
// are `files` (paths relative to the app's root) and whose content hash is `version`:
// - install: every built file (the page, its scripts and styles, the worker bundles, the HDF5 reader's
//   chunk) goes into the cache `torusgrav-<version>`; the new worker takes over at once;
// - activate: older torusgrav caches are deleted;
// - fetch (same origin, GET only): the page itself from the network first (so that a new build is
//   seen), falling back to the cached page when offline; everything else from the cache first.
// Responses are stored as the server sent them, headers included, so the cross-origin isolation headers
// (COOP/COEP, which SharedArrayBuffer needs) survive a reload served from the cache.

/** @param {string} version @param {readonly string[]} files @returns {string} */
export function serviceWorkerSource(version, files) {
  return `// torusgrav offline cache, written by the build: do not edit.
const CACHE = ${JSON.stringify(`torusgrav-${version}`)};
const FILES = ${JSON.stringify(['./', ...files.map((f) => `./${f}`)])};

self.addEventListener('install', (event) => {
  event.waitUntil(
    caches
      .open(CACHE)
      .then((cache) => cache.addAll(FILES.map((f) => new Request(f, { cache: 'reload' }))))
      .then(() => self.skipWaiting()),
  );
});

self.addEventListener('activate', (event) => {
  event.waitUntil(
    caches
      .keys()
      .then((keys) => Promise.all(keys.filter((k) => k.startsWith('torusgrav-') && k !== CACHE).map((k) => caches.delete(k))))
      .then(() => self.clients.claim()),
  );
});

async function pageResponse(request) {
  try {
    const fresh = await fetch(request);
    if (fresh.ok) return fresh;
    throw new Error('page answered ' + fresh.status);
  } catch (e) {
    const cached = await caches.match('./', { cacheName: CACHE });
    if (cached) return cached;
    throw e;
  }
}

async function fileResponse(request) {
  const cached = await caches.match(request, { ignoreSearch: true });
  if (cached) return cached;
  const fresh = await fetch(request);
  if (fresh.ok && fresh.type === 'basic') {
    const copy = fresh.clone();
    caches.open(CACHE).then((cache) => cache.put(request, copy)).catch(() => undefined);
  }
  return fresh;
}

self.addEventListener('fetch', (event) => {
  const request = event.request;
  if (request.method !== 'GET' || new URL(request.url).origin !== self.location.origin) return;
  event.respondWith(request.mode === 'navigate' ? pageResponse(request) : fileResponse(request));
});
`;
}
