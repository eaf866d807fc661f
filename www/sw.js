// Tern's service worker. scripts/finish-page.mjs fills in the build id and
// the exact list of files the build emits, and writes the result to
// dist/sw.js. It keeps those files for offline use and answers requests for
// them only; any other request passes it untouched (it never calls fetch()
// for anything but a file of this list). A new build installs beside the old
// one and waits: the page then says an update is available, and takes it
// when the user reloads through its button.

const BUILD = '__TERN_BUILD__';
const FILES = ['__TERN_FILES__'];

// Several copies of Tern may live on one host in different folders: each
// keeps its own cache, named after its scope.
const SCOPE = new URL(self.registration.scope);
const CACHE = `tern ${BUILD} ${SCOPE.pathname}`;
const OWN = `tern `;
const PATHS = new Set(FILES.map((f) => new URL(f, SCOPE).pathname));

self.addEventListener('install', (event) => {
  event.waitUntil(
    caches.open(CACHE).then((cache) => cache.addAll(FILES.map((f) => new Request(new URL(f, SCOPE), { cache: 'no-cache' })))),
  );
});

self.addEventListener('activate', (event) => {
  event.waitUntil(
    caches.keys().then((keys) =>
      Promise.all(keys.filter((k) => k.startsWith(OWN) && k.endsWith(` ${SCOPE.pathname}`) && k !== CACHE).map((k) => caches.delete(k))),
    ),
  );
});

self.addEventListener('fetch', (event) => {
  const request = event.request;
  const url = new URL(request.url);
  if (request.method !== 'GET' || url.origin !== SCOPE.origin) return;
  // The folder itself is its index.html.
  const path = url.pathname === SCOPE.pathname ? `${SCOPE.pathname}index.html` : url.pathname;
  if (!PATHS.has(path)) return;
  event.respondWith(
    caches.open(CACHE).then((cache) => cache.match(new URL(path, SCOPE.origin)).then((hit) => hit || fetch(request))),
  );
});

self.addEventListener('message', (event) => {
  if (event.data === 'tern: take the update') self.skipWaiting();
});
