/// <reference no-default-lib="true"/>
/// <reference lib="esnext" />
/// <reference lib="webworker" />
/// <reference types="@sveltejs/kit" />
/**
 * The offline copy of the app. SvelteKit registers this file itself (production builds).
 *
 * - install: every built file (app shell, chunks, the engine worker, styles) and every
 *   static file go into one cache named after the build's version. KaTeX fonts: only the
 *   woff2 files — every browser that can run this app takes woff2 first from KaTeX's
 *   @font-face lists, so the woff and ttf copies (about three times the bytes) would never
 *   be read. The single-page fallback `200.html` is cached on its own and a failure to
 *   fetch it does not stop the install (`vite preview` has no such file).
 * - activate: caches of older versions are deleted.
 * - fetch: same-origin GETs only; files of this build come from the cache first; page
 *   navigations go to the network and, when that fails, get the cached fallback page, so
 *   any deep link (`/models/<key>/build`) opens offline. Nothing is ever fetched from
 *   another origin.
 */
import { build, files, version } from '$service-worker';

const sw = self as unknown as ServiceWorkerGlobalScope;

const CACHE = `lakeledger-${version}`;
const FALLBACK = new URL('200.html', sw.registration.scope).pathname;

/** Fonts other than woff2 are never fetched by a browser that reads woff2. */
const notNeeded = (path: string) => /\.(woff|ttf|eot)$/i.test(path);

const ASSETS = [...build, ...files].filter((path) => !notNeeded(path));
const ASSET_SET = new Set(ASSETS);

sw.addEventListener('install', (event) => {
  event.waitUntil(
    (async () => {
      const cache = await caches.open(CACHE);
      await cache.addAll(ASSETS);
      try {
        const response = await fetch(FALLBACK, { cache: 'no-cache' });
        if (response.ok) await cache.put(FALLBACK, response);
      } catch {
        // No fallback page (a dev or preview server): online navigation still works.
      }
      await sw.skipWaiting();
    })()
  );
});

sw.addEventListener('activate', (event) => {
  event.waitUntil(
    (async () => {
      for (const key of await caches.keys()) {
        if (key !== CACHE && key.startsWith('lakeledger-')) await caches.delete(key);
      }
      await sw.clients.claim();
    })()
  );
});

async function fromCacheFirst(request: Request, path: string): Promise<Response> {
  const cache = await caches.open(CACHE);
  const hit = await cache.match(path);
  if (hit) return hit;
  const response = await fetch(request);
  if (response.ok) await cache.put(path, response.clone());
  return response;
}

async function page(request: Request): Promise<Response> {
  try {
    return await fetch(request);
  } catch {
    const cache = await caches.open(CACHE);
    const fallback = await cache.match(FALLBACK);
    if (fallback) return fallback;
    return new Response('Lake Ledger is offline and its pages are not stored yet.', {
      status: 503,
      headers: { 'content-type': 'text/plain; charset=utf-8' }
    });
  }
}

async function networkThenCache(request: Request): Promise<Response> {
  try {
    return await fetch(request);
  } catch (err) {
    const hit = await caches.match(request);
    if (hit) return hit;
    throw err;
  }
}

sw.addEventListener('fetch', (event) => {
  const request = event.request;
  if (request.method !== 'GET') return;
  const url = new URL(request.url);
  if (url.origin !== sw.location.origin) return;

  if (request.mode === 'navigate') {
    event.respondWith(page(request));
  } else if (ASSET_SET.has(url.pathname)) {
    event.respondWith(fromCacheFirst(request, url.pathname));
  } else {
    event.respondWith(networkThenCache(request));
  }
});
