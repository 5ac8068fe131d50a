import { compile, createCoreContext, registerMessageCompiler, registerMessageResolver, resolveValue, translate as coreTranslate } from '@intlify/core-base'
import { describe, expect, it } from 'vitest'
import { LOCALE_CODES } from '../../shared/i18n/locales'
import { rawMessage, translate } from '../../shared/i18n/translate'
import de from '../../i18n/locales/de/mail.json'
import en from '../../i18n/locales/en/mail.json'
import es from '../../i18n/locales/es/mail.json'
import fr from '../../i18n/locales/fr/mail.json'
import deDoc from '../../i18n/locales/de/doc.json'
import enDoc from '../../i18n/locales/en/doc.json'
import esDoc from '../../i18n/locales/es/doc.json'
import frDoc from '../../i18n/locales/fr/doc.json'
import deSafety from '../../i18n/locales/de/safety.json'
import enSafety from '../../i18n/locales/en/safety.json'
import esSafety from '../../i18n/locales/es/safety.json'
import frSafety from '../../i18n/locales/fr/safety.json'

// The server's translator must read the message files exactly as vue-i18n does on the pages:
// every message of mail.json, doc.json and safety.json, in every language, with placeholders
// filled and plural choices picked, compared with @intlify/core-base (vue-i18n's own core).
registerMessageCompiler(compile)
registerMessageResolver(resolveValue)
// The core's overloads are typed for vue-i18n's own generics; these calls only pass plain messages and values.
const coreContext = createCoreContext as unknown as (options: object) => unknown
const coreT = coreTranslate as unknown as (ctx: unknown, key: string, ...rest: unknown[]) => string
const files = { en: [en, enDoc, enSafety], de: [de, deDoc, deSafety], es: [es, esDoc, esSafety], fr: [fr, frDoc, frSafety] }
const keysOf = (o: object, p = ''): string[] => Object.entries(o).flatMap(([k, v]) => (typeof v === 'object' ? keysOf(v, `${p}${k}.`) : [`${p}${k}`]))

describe('translate agrees with vue-i18n', () => {
  for (const locale of LOCALE_CODES) {
    it(`${locale}: every message, with named values and counts 0, 1, 2 and 5`, () => {
      const messages = { [locale]: Object.assign({}, ...files[locale].map((f) => JSON.parse(JSON.stringify(f)))) }
      const ctx = coreContext({ locale, messages, missingWarn: false, fallbackWarn: false })
      const keys = files[locale].flatMap((f) => keysOf(f))
      let plural = 0
      for (const key of keys) {
        const raw = rawMessage(locale, key)!
        const names = [...raw.matchAll(/\{\s*([A-Za-z_$][\w$]*)\s*\}/g)].map((m) => m[1]!)
        const named = Object.fromEntries(names.map((n) => [n, `<${n}>`]))
        expect(translate(locale, key, named), key).toBe(coreT(ctx, key, named))
        if (raw.includes('|')) {
          plural++
          for (const n of [0, 1, 2, 5]) {
            const withCount = Object.fromEntries(names.filter((x) => x !== 'n' && x !== 'count').map((x) => [x, `<${x}>`]))
            expect(translate(locale, key, withCount, n), `${key} ${n}`).toBe(coreT(ctx, key, n, { named: withCount }))
          }
        }
      }
      expect(keys.length).toBeGreaterThan(150)
      expect(plural).toBeGreaterThan(3)
    })
  }
})
