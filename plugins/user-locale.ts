import { isLocale } from '#shared/i18n/locales'

/**
 * A signed-in account reads Umbrafield in its own language (users.locale), on the server's first
 * render and after signing in or changing it on the account page. Signed-out visitors keep what the
 * module chose: the switcher's cookie, else Accept-Language, else English.
 */
export default defineNuxtPlugin({
  name: 'user-locale',
  dependsOn: ['i18n:plugin'],
  async setup() {
    const i18n = useNuxtApp().$i18n
    const follow = async (code: unknown) => {
      if (isLocale(code) && code !== i18n.locale.value) await i18n.setLocale(code)
    }
    // Signed-out visitors cost no request on the server: the account is loaded only with a session cookie.
    if (import.meta.server && !useCookie('nuxt-session').value) return
    const { data: me } = await useMe()
    await follow(me.value?.locale)
    if (import.meta.client) watch(() => me.value?.locale, follow)
  },
})
