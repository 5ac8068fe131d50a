/**
 * The languages Umbrafield speaks. `code` is what accounts store (users.locale) and what the
 * language cookie holds; `language` is the BCP 47 tag used for `<html lang>` and for `Intl`.
 * Pure data: imported by nuxt.config.ts, the server and the browser alike.
 */
export const LOCALES = [
  { code: 'en', language: 'en-GB', name: 'English' },
  { code: 'de', language: 'de-DE', name: 'Deutsch' },
  { code: 'es', language: 'es-ES', name: 'Español' },
  { code: 'fr', language: 'fr-FR', name: 'Français' },
] as const

export type LocaleCode = (typeof LOCALES)[number]['code']

export const LOCALE_CODES = LOCALES.map(l => l.code) as [LocaleCode, ...LocaleCode[]]

export const DEFAULT_LOCALE: LocaleCode = 'en'

/** The message files of each locale, under i18n/locales/<code>/; together they hold every key. */
export const LOCALE_FILES = ['app.json', 'mail.json', 'doc.json', 'safety.json', 'trip.json'] as const

export function isLocale(value: unknown): value is LocaleCode {
  return typeof value === 'string' && (LOCALE_CODES as readonly string[]).includes(value)
}

/** The BCP 47 tag for `Intl` and `<html lang>`; unknown codes read English. */
export function languageTag(code: string | null | undefined): string {
  return LOCALES.find(l => l.code === code)?.language ?? 'en-GB'
}
