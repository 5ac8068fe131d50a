/**
 * Forgets what this device kept for offline use: the countdown's copies of timetables and the
 * guide's emergency sheet in localStorage, the service worker and its cache. Called on sign-out, so a shared device keeps nothing.
 */
export async function forgetOfflineCopies(): Promise<void> {
  if (typeof window === 'undefined') return
  for (let i = localStorage.length - 1; i >= 0; i--) {
    const k = localStorage.key(i)
    if (k?.startsWith('umbrafield:countdown:') || k?.startsWith('umbrafield:emergency:')) localStorage.removeItem(k)
  }
  // The worker goes too (the countdown registers it again when opened), so nothing is re-cached.
  if ('serviceWorker' in navigator) {
    // The worker still in charge of this page stops caching at once, then is unregistered.
    const worker = navigator.serviceWorker.controller
    if (worker) {
      await new Promise<void>((resolve) => {
        const done = (e: MessageEvent) => { if (e.data?.type === 'forgotten') { navigator.serviceWorker.removeEventListener('message', done); resolve() } }
        navigator.serviceWorker.addEventListener('message', done)
        worker.postMessage({ type: 'forget' })
        setTimeout(resolve, 2000)
      })
    }
    for (const reg of await navigator.serviceWorker.getRegistrations()) await reg.unregister()
  }
  if ('caches' in window) {
    for (const name of await caches.keys()) if (name.startsWith('umbrafield-')) await caches.delete(name)
  }
}
