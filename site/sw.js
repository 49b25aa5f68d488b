// railnote's service worker: a hosted copy keeps working once the network is gone.
//
// On install it caches every site file, listed with a version by the site build in
// pkg/precache.js (xtask/src/offline.rs: every file below site/, so a new file is cached without
// anyone listing it; the version is a hash of them all), under the cache `railnote-<version>`.
// It answers the site's own GET requests from that cache first (a page's query is ignored, so
// linear.html?vin-min=… is linear.html), else from the network, keeping a copy. On activate it
// deletes every other railnote- cache. A rebuilt site changes pkg/precache.js, the browser's
// update check (on navigation; registered with updateViaCache 'none') finds the changed worker,
// and the new version takes over: installed, activated at once (skipWaiting, clients.claim).
// Registered by js/common.js over http(s) only, through the Trusted Types policy `railnote-sw`.
/* global importScripts, RAILNOTE_PRECACHE */
importScripts('pkg/precache.js');

const { version, files } = self.RAILNOTE_PRECACHE;
const PREFIX = 'railnote-';
const CACHE = `${PREFIX}${version}`;

self.addEventListener('install', (event) => {
  event.waitUntil((async () => {
    const cache = await caches.open(CACHE);
    // cache: 'reload' skips the HTTP cache, so a new version never caches an older file.
    await cache.addAll(files.map((f) => new Request(new URL(f, self.registration.scope), { cache: 'reload' })));
    await self.skipWaiting();
  })());
});

self.addEventListener('activate', (event) => {
  event.waitUntil((async () => {
    const names = await caches.keys();
    await Promise.all(names.filter((n) => n.startsWith(PREFIX) && n !== CACHE).map((n) => caches.delete(n)));
    await self.clients.claim();
  })());
});

self.addEventListener('fetch', (event) => {
  const request = event.request;
  if (request.method !== 'GET') return;
  const url = new URL(request.url);
  if (url.origin !== self.location.origin || !url.href.startsWith(self.registration.scope)) return;
  event.respondWith(cacheFirst(request));
});

async function cacheFirst(request) {
  const cache = await caches.open(CACHE);
  const hit = await cache.match(request, { ignoreSearch: true });
  if (hit) return hit;
  const response = await fetch(request);
  // Keep a copy of a good answer (a file added since install), so it works offline next time.
  if (response.ok && response.type === 'basic') await cache.put(request, response.clone());
  return response;
}
