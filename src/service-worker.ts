/// <reference types="@sveltejs/kit" />
/// <reference no-default-lib="true"/>
/// <reference lib="esnext" />
/// <reference lib="webworker" />
// Offline support for the site walk: the app's own files are cached at install, and the
// board pages a technician has opened (their HTML, data and photo) are kept, so a board can be
// reopened in a plant room with no signal. Board content itself lives in IndexedDB (the sync
// provider); this only makes sure the page around it loads.
import { build, files, version } from '$service-worker';

const sw = self as unknown as ServiceWorkerGlobalScope;
const SHELL = `spotface-shell-${version}`;
const PAGES = 'spotface-pages';
const SHELL_FILES = [...build, ...files];

const BOARD_PAGE = /^\/surveys\/[0-9a-f-]{36}\/boards\/[0-9a-f-]{36}\/?(__data\.json)?$/i;
const MEDIA_IMAGE = /^\/api\/v1\/media\/[0-9a-f-]{36}\/(display|thumb)$/i;
// A job page, so the installer can reopen it on site with no signal (records wait in IndexedDB).
const JOB_PAGE = /^\/jobs\/[0-9a-f-]{36}\/?(__data\.json)?$/i;

sw.addEventListener('install', (event) => {
	event.waitUntil(
		caches
			.open(SHELL)
			.then((c) => c.addAll(SHELL_FILES))
			.then(() => sw.skipWaiting())
	);
});

sw.addEventListener('activate', (event) => {
	event.waitUntil(
		caches
			.keys()
			.then((keys) => Promise.all(keys.filter((k) => k.startsWith('spotface-shell-') && k !== SHELL).map((k) => caches.delete(k))))
			.then(() => sw.clients.claim())
	);
});

sw.addEventListener('message', (event) => {
	// Sent at sign-out: forget the pages kept for offline use (the board content stays in
	// IndexedDB so unsynced field work is never lost).
	if (event.data === 'spotface:forget-pages') event.waitUntil(caches.delete(PAGES));
});

sw.addEventListener('fetch', (event) => {
	const req = event.request;
	if (req.method !== 'GET') return;
	const url = new URL(req.url);
	if (url.origin !== sw.location.origin) return;

	if (SHELL_FILES.includes(url.pathname)) {
		event.respondWith(caches.match(url.pathname).then((hit) => hit ?? fetch(req)));
		return;
	}
	if (BOARD_PAGE.test(url.pathname) || JOB_PAGE.test(url.pathname) || MEDIA_IMAGE.test(url.pathname)) {
		// Network first, so the board is always current when there is signal; the last good
		// answer when there is none.
		event.respondWith(
			fetch(req)
				.then(async (res) => {
					if (res.ok && !res.redirected) {
						const copy = res.clone();
						const cache = await caches.open(PAGES);
						await cache.put(req, copy);
					}
					return res;
				})
				.catch(async () => {
					const cache = await caches.open(PAGES);
					const hit = (await cache.match(req)) ?? (await cache.match(req, { ignoreSearch: true }));
					if (hit) return hit;
					return new Response('Offline: this page was not opened on this device before.', {
						status: 503,
						headers: { 'content-type': 'text/plain; charset=utf-8' }
					});
				})
		);
	}
});
