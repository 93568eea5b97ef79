// The service worker: keeps every file the app needs in a cache named after the build, so the app
// starts and computes with no network and no server. A new build (new version.js) installs a new
// cache and removes the old ones when it activates. Only same-origin GET requests are answered;
// nothing is ever sent elsewhere.
'use strict';

importScripts('version.js');

const VERSION = self.SIZEBUDGET_VERSION || 'dev';
const CACHE = `sizebudget-${VERSION}`;
const FILES = [
  './',
  'index.html',
  'style.css',
  'app.js',
  'api.js',
  'fields.js',
  'results.js',
  'sessions.js',
  'analysis.js',
  'worker.js',
  'wasm_exec.js',
  'main.wasm',
  'version.js',
  'manifest.webmanifest',
  'icons/icon.svg',
  'icons/icon-192.png',
  'icons/icon-512.png',
];

self.addEventListener('install', (event) => {
  event.waitUntil((async () => {
    const cache = await caches.open(CACHE);
    await cache.addAll(FILES.map((f) => new Request(f, { cache: 'reload' })));
    await self.skipWaiting();
  })());
});

self.addEventListener('activate', (event) => {
  event.waitUntil((async () => {
    for (const key of await caches.keys()) {
      if (key.startsWith('sizebudget-') && key !== CACHE) await caches.delete(key);
    }
    await self.clients.claim();
  })());
});

self.addEventListener('fetch', (event) => {
  const req = event.request;
  const url = new URL(req.url);
  if (req.method !== 'GET' || url.origin !== self.location.origin) return;
  event.respondWith((async () => {
    const cache = await caches.open(CACHE);
    const hit = await cache.match(req, { ignoreSearch: true });
    if (hit) return hit;
    if (req.mode === 'navigate') {
      const index = await cache.match('index.html');
      if (index) return index;
    }
    return fetch(req);
  })());
});

self.addEventListener('message', (event) => {
  if (event.data === 'version' && event.source) event.source.postMessage({ type: 'version', version: VERSION, cache: CACHE });
});
