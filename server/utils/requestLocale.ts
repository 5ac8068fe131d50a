import type { H3Event } from 'h3'
import { DEFAULT_LOCALE, isLocale, LOCALE_CODES, type LocaleCode } from '../../shared/i18n/locales'

/** The language cookie the header's switcher sets (nuxt.config.ts, i18n.detectBrowserLanguage.cookieKey). */
export const LOCALE_COOKIE = 'umbrafield_locale'

/**
 * The language a request's documents (PDFs, calendar files) are written in: the signed-in account's
 * locale, else the language cookie, else the first supported language of Accept-Language (by its
 * q-values, RFC 9110 §12.5.4), else English.
 */
export function requestLocale(event: H3Event, user?: { locale?: string | null } | null): LocaleCode {
  if (user && isLocale(user.locale)) return user.locale
  const cookie = getCookie(event, LOCALE_COOKIE)
  if (isLocale(cookie)) return cookie
  const header = getRequestHeader(event, 'accept-language') ?? ''
  const ranked = header.split(',').map((part, i) => {
    const [tag, ...params] = part.trim().split(';')
    const q = Number(params.find((p) => p.trim().startsWith('q='))?.trim().slice(2) ?? '1')
    return { code: (tag ?? '').trim().toLowerCase().split('-')[0]!, q: Number.isFinite(q) ? q : 0, i }
  }).filter((x) => x.q > 0).sort((a, b) => b.q - a.q || a.i - b.i)
  return ranked.map((x) => x.code).find((c): c is LocaleCode => (LOCALE_CODES as readonly string[]).includes(c)) ?? DEFAULT_LOCALE
}
