import deDoc from '../../i18n/locales/de/doc.json'
import deMail from '../../i18n/locales/de/mail.json'
import deSafety from '../../i18n/locales/de/safety.json'
import deTrip from '../../i18n/locales/de/trip.json'
import enDoc from '../../i18n/locales/en/doc.json'
import enMail from '../../i18n/locales/en/mail.json'
import enSafety from '../../i18n/locales/en/safety.json'
import enTrip from '../../i18n/locales/en/trip.json'
import esDoc from '../../i18n/locales/es/doc.json'
import esMail from '../../i18n/locales/es/mail.json'
import esSafety from '../../i18n/locales/es/safety.json'
import esTrip from '../../i18n/locales/es/trip.json'
import frDoc from '../../i18n/locales/fr/doc.json'
import frMail from '../../i18n/locales/fr/mail.json'
import frSafety from '../../i18n/locales/fr/safety.json'
import frTrip from '../../i18n/locales/fr/trip.json'
import { DEFAULT_LOCALE, isLocale, type LocaleCode } from './locales'

/**
 * Umbrafield's translator outside Vue: e-mails, calendar files, PDFs and the shared safety text.
 * It reads the same message files as the pages (i18n/locales/<code>/{mail,doc,safety,trip}.json, bundled
 * at build time, no I/O at run time) and follows vue-i18n's message syntax for what those files use:
 * `{name}` placeholders, `{'literal'}` text, and `|` plural choices picked by vue-i18n's default rule
 * (two choices: one | other; three: zero | one | other), with `{count}` and `{n}` set to the number.
 * A key missing in a locale falls back to English; a key missing everywhere reads as the key.
 */
type Tree = { [key: string]: string | Tree }

const MESSAGES: Record<LocaleCode, Tree[]> = {
  en: [enMail, enDoc, enSafety, enTrip] as Tree[],
  de: [deMail, deDoc, deSafety, deTrip] as Tree[],
  es: [esMail, esDoc, esSafety, esTrip] as Tree[],
  fr: [frMail, frDoc, frSafety, frTrip] as Tree[],
}

export type Params = Record<string, string | number>

function lookup(locale: LocaleCode, key: string): string | undefined {
  for (const tree of MESSAGES[locale]) {
    let node: string | Tree | undefined = tree
    for (const part of key.split('.')) node = typeof node === 'object' ? node[part] : undefined
    if (typeof node === 'string') return node
  }
  return undefined
}

/** vue-i18n's default plural rule (core-base `pluralDefault`). */
function choiceIndex(count: number, choices: number): number {
  const c = Math.abs(count)
  if (choices === 2) return c ? (c > 1 ? 1 : 0) : 1
  return c ? Math.min(c, 2) : 0
}

function interpolate(message: string, params: Params): string {
  return message.replace(/\{\s*(?:'([^']*)'|([A-Za-z_$][\w$]*))\s*\}/g, (whole, literal: string | undefined, name: string | undefined) => {
    if (literal !== undefined) return literal
    const v = params[name!]
    return v === undefined ? '' : String(v)
  })
}

/**
 * In the browser the page's bundler hands these files over as compiled vue-i18n messages rather than
 * text, so `lookup` finds no string there; the app then registers the page's own translator
 * (plugins/shared-translator.client.ts), which reads the same messages. Server code never needs it.
 */
export type AppTranslate = (locale: LocaleCode, key: string, params: Params, count?: number) => string | undefined
let appTranslate: AppTranslate | undefined
export function useAppTranslator(fn: AppTranslate | undefined) {
  appTranslate = fn
}

/** The message at `key` in `locale` (English where that locale lacks it), with its placeholders filled. */
export function translate(locale: string | null | undefined, key: string, params: Params = {}, count?: number): string {
  const code: LocaleCode = isLocale(locale) ? locale : DEFAULT_LOCALE
  const message = lookup(code, key) ?? lookup(DEFAULT_LOCALE, key)
  if (message === undefined) return appTranslate?.(code, key, params, count) ?? key
  const choices = message.split('|').map((s) => s.trim())
  // Without a count vue-i18n still picks a choice, as if the count were one (its plural index −1).
  const picked = choices.length > 1 ? choices[Math.min(choiceIndex(count ?? -1, choices.length), choices.length - 1)]! : message
  return interpolate(picked, count === undefined ? params : { count, n: count, ...params })
}

/** A translator bound to one locale: `t('mail.hello', { name })`, `t('mail.seats', {}, 2)`. */
export function translator(locale: string | null | undefined) {
  const code: LocaleCode = isLocale(locale) ? locale : DEFAULT_LOCALE
  const t = (key: string, params: Params = {}, count?: number) => translate(code, key, params, count)
  return Object.assign(t, { locale: code })
}

export type Translator = ReturnType<typeof translator>

/** The raw message (no placeholders filled), e.g. for checking that every locale has every line. */
export function rawMessage(locale: LocaleCode, key: string): string | undefined {
  return lookup(locale, key)
}
