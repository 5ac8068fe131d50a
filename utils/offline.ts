/**
 * Forgets what this device kept for offline use: the countdown's copies of timetables in
 * localStorage and the service worker's cache. Called on sign-out, so a shared device keeps nothing.
 */
export async function forgetOfflineCopies(): Promise<void> {
  if (typeof window === 'undefined') return
  for (let i = localStorage.length - 1; i >= 0; i--) {
    const k = localStorage.key(i)
    if (k?.startsWith('umbrafield:countdown:')) localStorage.removeItem(k)
  }
  if ('caches' in window) {
    for (const name of await caches.keys()) if (name.startsWith('umbrafield-')) await caches.delete(name)
  }
}
