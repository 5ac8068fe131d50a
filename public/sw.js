// Umbrafield service worker: keeps the day-of countdown usable with no signal.
// Network first for the countdown page, its data and the app's assets; the cache answers when offline.
const CACHE = 'umbrafield-countdown-v1'

self.addEventListener('install', () => self.skipWaiting())
self.addEventListener('activate', (e) => e.waitUntil(self.clients.claim()))

const cacheable = (url) =>
  url.origin === self.location.origin && (
    /^\/trips\/\d+\/countdown\/\d+/.test(url.pathname) ||
    /^\/api\/trips\/\d+\/timetable$/.test(url.pathname) ||
    /^\/voyages\/\d+\/countdown$/.test(url.pathname) || /^\/api\/voyages\/\d+$/.test(url.pathname) ||
    url.pathname.startsWith('/_nuxt/') || url.pathname === '/logo.svg')

// After sign-out the page says "forget": this worker stops caching and empties its cache.
let forgetting = false

self.addEventListener('fetch', (e) => {
  const url = new URL(e.request.url)
  if (forgetting || e.request.method !== 'GET' || !cacheable(url)) return
  e.respondWith(
    fetch(e.request)
      .then((res) => {
        if (res.ok) { const copy = res.clone(); caches.open(CACHE).then((c) => c.put(e.request, copy)) }
        return res
      })
      .catch(() => caches.match(e.request, { ignoreSearch: true }).then((r) => r || Response.error())),
  )
})

// The page sends what it loaded before the worker took control, so that it is cached too.
self.addEventListener('message', (e) => {
  if (e.data?.type === 'forget') {
    forgetting = true
    e.waitUntil(caches.keys().then((names) => Promise.all(names.filter((n) => n.startsWith('umbrafield-')).map((n) => caches.delete(n))))
      .then(() => e.source?.postMessage({ type: 'forgotten' })))
    return
  }
  if (e.data?.type !== 'cache-urls') return
  e.waitUntil(caches.open(CACHE).then((c) => Promise.all(e.data.urls.map((u) =>
    fetch(u, { credentials: 'same-origin' }).then((res) => (res.ok ? c.put(u, res) : undefined)).catch(() => undefined)))).then(() => {
    e.source?.postMessage({ type: 'cached', count: e.data.urls.length })
  }))
})

// The day's decision, pushed (Web Push, opted in on the countdown page): shown as a notification;
// tapping it opens the acknowledgement page the message links to.
self.addEventListener('push', (e) => {
  let data = {}
  try { data = e.data ? e.data.json() : {} } catch { data = { title: 'Umbrafield', body: e.data ? e.data.text() : '' } }
  e.waitUntil(self.registration.showNotification(data.title || 'Umbrafield', {
    body: data.body || '', icon: '/logo.svg', tag: 'umbrafield-decision', renotify: true, requireInteraction: true, data: { url: data.url || '/' },
  }))
})

self.addEventListener('notificationclick', (e) => {
  e.notification.close()
  const target = e.notification.data && e.notification.data.url
  if (!target || new URL(target, self.location.origin).origin !== self.location.origin) return
  e.waitUntil(self.clients.openWindow(target))
})
