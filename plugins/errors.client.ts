/** Logs client-side errors to the browser console, where production builds would otherwise swallow them. */
export default defineNuxtPlugin((nuxtApp) => {
  nuxtApp.hook('vue:error', (err, _instance, info) => console.error('[umbrafield] vue error', info, err))
  nuxtApp.hook('app:error', (err) => console.error('[umbrafield] app error', err))
})
