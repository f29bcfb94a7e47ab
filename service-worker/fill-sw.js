// The fill page's service worker (decision 0050): registered only by /events/<id>/fill, scope /events/.
// It keeps the fill page's client-rendered shell (no personal data; its nonce and policy travel with
// it), the scripts, styles, font and icons that page needs, and the club's public key fetched with the
// shell. Navigations to any /events/<id>/fill go to the network first and fall back to the kept shell;
// every other request is left alone (network only, no-store as the server says).

const PRECACHE = self.__WB_MANIFEST
const SHELL = '/events/_/fill'
const KEY = '/api/fill-snapshots/key'
const FILL_PAGE = /^\/events\/[^/]+\/fill\/?$/

/** A short stable hash of the precache list: a new build gets a new cache, the old one is dropped. */
function versionOf(list) {
  let h = 0
  for (const ch of JSON.stringify(list)) h = (h * 31 + ch.charCodeAt(0)) | 0
  return (h >>> 0).toString(36)
}
const CACHE = `hoopwise-fill-${versionOf(PRECACHE)}`
const ASSETS = new Set(PRECACHE.map(e => new URL(e.url, self.location.origin).pathname))

self.addEventListener('install', (event) => {
  event.waitUntil((async () => {
    const cache = await caches.open(CACHE)
    await cache.addAll([...ASSETS])
    await cache.put(SHELL, await fetch(SHELL, { credentials: 'same-origin', cache: 'no-store' }))
    // The public key ships with the shell; a signed-out install keeps the one it gets later.
    const key = await fetch(KEY, { credentials: 'same-origin', cache: 'no-store' }).catch(() => null)
    if (key?.ok) await cache.put(KEY, key)
    await self.skipWaiting()
  })())
})

self.addEventListener('activate', (event) => {
  event.waitUntil((async () => {
    for (const name of await caches.keys()) {
      if (name.startsWith('hoopwise-fill-') && name !== CACHE) await caches.delete(name)
    }
    await self.clients.claim()
  })())
})

/** The network's answer, kept under `key` when good; the kept answer when the network fails. */
async function networkFirst(request, key) {
  const cache = await caches.open(CACHE)
  try {
    const response = await fetch(request)
    if (response.ok) await cache.put(key, response.clone())
    return response
  }
  catch (error) {
    const kept = await cache.match(key)
    if (kept) return kept
    throw error
  }
}

self.addEventListener('fetch', (event) => {
  const request = event.request
  if (request.method !== 'GET') return
  const url = new URL(request.url)
  if (url.origin !== self.location.origin) return
  if (request.mode === 'navigate') {
    if (FILL_PAGE.test(url.pathname)) event.respondWith(networkFirst(request, SHELL))
    return
  }
  if (url.pathname === KEY) {
    event.respondWith(networkFirst(request, KEY))
    return
  }
  if (ASSETS.has(url.pathname)) {
    event.respondWith(caches.open(CACHE).then(c => c.match(url.pathname)).then(hit => hit ?? fetch(request)))
  }
})
