// vue-i18n options shared by every locale. Messages live in i18n/locales/<code>/*.json.
export default defineI18nConfig(() => ({
  legacy: false,
  fallbackLocale: 'en',
  // A missing key falls back to English at run time, but tests/unit/i18n-keys.spec.ts fails first.
  missingWarn: false,
  fallbackWarn: false,
}))
