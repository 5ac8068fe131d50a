import { useAppTranslator } from '#shared/i18n/translate'

/**
 * The shared texts (safety lines, cue labels, the time-basis line) are written by code in shared/,
 * which translates through shared/i18n/translate.ts. In the page bundle the message files arrive
 * compiled for vue-i18n, so that translator asks the page's vue-i18n for the same key instead.
 */
export default defineNuxtPlugin({
  name: 'shared-translator',
  dependsOn: ['i18n:plugin'],
  setup() {
    const i18n = useNuxtApp().$i18n
    useAppTranslator((locale, key, params, count) => {
      const at = i18n.te(key, locale) ? locale : i18n.te(key, 'en') ? 'en' : null
      if (!at) return undefined
      return count === undefined ? i18n.t(key, params, { locale: at }) : i18n.t(key, params, { locale: at, plural: count })
    })
  },
})
