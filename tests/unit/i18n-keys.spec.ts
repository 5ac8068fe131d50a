import { readdirSync, readFileSync, statSync } from 'node:fs'
import { join, resolve } from 'node:path'
import { baseCompile } from '@intlify/message-compiler'
import { describe, expect, it } from 'vitest'
import { LOCALE_CODES, LOCALE_FILES } from '../../shared/i18n/locales'
import { MESSAGE_TEXTS } from '../../composables/localMessage'

/**
 * Every message file of every locale, read from i18n/locales/<code>/ (the whole folder, so files other
 * areas add are covered too): the same keys everywhere, the same placeholders, a translation for
 * every text, and messages vue-i18n can compile.
 */
const ROOT = resolve(__dirname, '../../i18n/locales')
type Flat = Map<string, string>

function flatten(value: unknown, prefix: string, out: Flat) {
  if (typeof value === 'string') out.set(prefix, value)
  else if (value && typeof value === 'object' && !Array.isArray(value)) {
    for (const [k, v] of Object.entries(value)) flatten(v, prefix ? `${prefix}.${k}` : k, out)
  } else out.set(prefix, `<<not a string: ${JSON.stringify(value)}>>`)
}

/** locale → file → key → text */
const files = new Map<string, Map<string, Flat>>()
for (const code of readdirSync(ROOT).filter((d) => statSync(join(ROOT, d)).isDirectory())) {
  const byFile = new Map<string, Flat>()
  for (const f of readdirSync(join(ROOT, code)).filter((n) => n.endsWith('.json'))) {
    const flat: Flat = new Map()
    flatten(JSON.parse(readFileSync(join(ROOT, code, f), 'utf8')), '', flat)
    byFile.set(f, flat)
  }
  files.set(code, byFile)
}
const en = files.get('en')!
const others = LOCALE_CODES.filter((c) => c !== 'en')

/**
 * Words that stay the same in every language because the trade (or a standard) writes them so. A text
 * may equal its English original only when nothing else is left once these and placeholders are taken out.
 */
const TRADE_TERMS = [
  'C1', 'C2', 'C3', 'C4', // contact times, as eclipse literature writes them in every language
  'UTC', 'UT', 'TT', 'ΔT', // time scales (ITU/IAU names, never translated)
  'ICS', 'PDF', 'JSON', 'CSV', 'QR', // file formats and the QR code's own name
  'TOTP', 'RFC 6238', // the one-time password standard
  'ISO 12312-2', 'ISO 4217', // the viewer standard and the currency code list
  'Umbrafield', // the product's name
]
/** Keys whose text legitimately equals the English one in one language, with the reason. */
const SAME_AS_ENGLISH: Record<string, string> = {
  // An HTTP status line: "Error 404" is also what Spanish writes.
  'es:app.json:error.code': 'Error {code}',
  // Unit symbols (SI "min" and "s", the day "d"), the same in every language.
  'de:trip.json:trip.duration.minSec': '{min} min {sec} s',
  'es:trip.json:trip.duration.minSec': '{min} min {sec} s',
  'fr:trip.json:trip.duration.minSec': '{min} min {sec} s',
  'es:trip.json:countdown.days': '{d} d',
  'de:doc.json:doc.pdf.duration': '{min} min {sec} s',
  'es:doc.json:doc.pdf.duration': '{min} min {sec} s',
  'fr:doc.json:doc.pdf.duration': '{min} min {sec} s',
  'de:doc.json:doc.pdf.heightM': '{m} m',
  'es:doc.json:doc.pdf.heightM': '{m} m',
  'de:mail.json:mail.itinerary.central': '{phase}: {seconds} s',
  'es:mail.json:mail.itinerary.central': '{phase}: {seconds} s',
}
/**
 * Texts that need plural forms in one language only: Spanish and French put the article or the noun
 * of a clock hour in the singular for one o'clock ("a la una", "vers 1 heure"), English does not.
 */
const PLURAL_ONLY_HERE: Record<string, true> = {
  'es:doc.json:doc.clock.at': true,
  'fr:doc.json:doc.clock.at': true,
}
/**
 * Single words that the language writes exactly as English does (a shared or borrowed word, checked
 * by a reader of that language): equal texts made of one of these are not misses.
 */
const SAME_WORD: Record<string, string[]> = {
  de: ['Status', 'Briefing', 'Countdown', 'hybrid', 'total'],
  es: ['total'],
  fr: ['Briefing', 'Messages', 'horizon', 'double', 'Contact', 'CONTACT', 'Menu'],
}
/**
 * Keys whose texts are names or symbols rather than words: star and planet names (the IAU's names,
 * which several languages share) and compass-point letters (German writes O for east, the others E).
 */
const NAME_KEYS = [/^briefing\.sky\.name\./, /^doc\.planets\./, /^briefing\.diagram\.short\./]

// Which placeholders a text uses (each once): a translation may repeat one in its plural forms or drop a repeat.
const placeholders = (s: string) => [...new Set([...s.matchAll(/\{\s*([A-Za-z0-9_]+)\s*\}/g)].map((m) => m[1]))].sort()
function leftOver(text: string): string {
  let s = text.replace(/\{\s*[A-Za-z0-9_]+\s*\}/g, ' ')
  for (const t of [...TRADE_TERMS].sort((a, b) => b.length - a.length)) s = s.split(t).join(' ')
  return s.replace(/[^\p{L}]+/gu, '')
}

describe('message files', () => {
  it('there is one folder per supported locale, and the declared files exist in each', () => {
    expect([...files.keys()].sort()).toEqual([...LOCALE_CODES].sort())
    for (const code of LOCALE_CODES) for (const f of LOCALE_FILES) expect(files.get(code)?.has(f), `${code}/${f}`).toBe(true)
  })

  it.each(others)('%s has the same files and exactly the same keys as English', (code) => {
    const mine = files.get(code)!
    expect([...mine.keys()].sort()).toEqual([...en.keys()].sort())
    const problems: string[] = []
    for (const [f, keys] of en) {
      const theirs = mine.get(f) ?? new Map()
      for (const k of keys.keys()) if (!theirs.has(k)) problems.push(`missing ${code}/${f} ${k}`)
      for (const k of theirs.keys()) if (!keys.has(k)) problems.push(`extra ${code}/${f} ${k}`)
    }
    expect(problems).toEqual([])
  })

  it.each(others)('%s translates every text (only trade terms and placeholders may stay English)', (code) => {
    const untranslated: string[] = []
    let compared = 0
    for (const [f, keys] of en) {
      for (const [k, english] of keys) {
        const text = files.get(code)?.get(f)?.get(k)
        if (text === undefined) continue
        compared++
        if (text.trim() === '') untranslated.push(`${code}/${f} ${k}: empty`)
        else if (text === english && leftOver(english) !== '' && SAME_AS_ENGLISH[`${code}:${f}:${k}`] !== english && !SAME_WORD[code]?.includes(text) && !NAME_KEYS.some(re => re.test(k))) untranslated.push(`${code}/${f} ${k}: "${text}"`)
      }
    }
    expect(untranslated).toEqual([])
    // The shell and sign-in pages alone hold well over a hundred texts: an empty walk would prove nothing.
    expect(compared).toBeGreaterThan(100)
  })

  it('the allow-lists do not hide a translated text (each entry still matches the English)', () => {
    for (const [id, english] of Object.entries(SAME_AS_ENGLISH)) {
      const [, f, k] = id.split(':') as [string, string, string]
      expect(en.get(f)?.get(k), id).toBe(english)
    }
  })

  it.each(LOCALE_CODES)('%s uses the same placeholders as English, and every message compiles', (code) => {
    const problems: string[] = []
    for (const [f, keys] of en) {
      for (const [k, english] of keys) {
        const text = files.get(code)?.get(f)?.get(k)
        if (text === undefined) continue
        if (placeholders(text).join() !== placeholders(english).join()) problems.push(`${code}/${f} ${k}: {${placeholders(text)}} vs {${placeholders(english)}}`)
        // "|" splits a message into plural forms: a stray one would show half the text.
        if (text.includes('|') !== english.includes('|') && !PLURAL_ONLY_HERE[`${code}:${f}:${k}`]) problems.push(`${code}/${f} ${k}: plural bar differs from English`)
        const errors: string[] = []
        baseCompile(text, { onError: (e) => errors.push(e.message) })
        if (errors.length) problems.push(`${code}/${f} ${k}: ${errors.join('; ')}`)
      }
    }
    expect(problems).toEqual([])
  })

  it('a placeholder that differs is caught (the check itself can fail)', () => {
    expect(placeholders('Noch {left} von {total}').join()).not.toBe(placeholders('{left} of {count} left').join())
    expect(leftOver('{page} — Umbrafield')).toBe('')
    expect(leftOver('Sign in')).not.toBe('')
  })
})

describe('messages namespace', () => {
  /** Every English message the pages translate is one the code really sends, word for word. */
  function sourceText(dir: string): string {
    let out = ''
    for (const name of readdirSync(dir)) {
      const p = join(dir, name)
      if (statSync(p).isDirectory()) out += sourceText(p)
      else if (/\.(ts|vue)$/.test(name)) out += readFileSync(p, 'utf8')
    }
    return out
  }
  const root = resolve(__dirname, '../..')
  const source = ['shared', 'server', 'composables'].map((d) => sourceText(join(root, d))).join('\n')
  const messages = [...en.get('app.json')!].filter(([k]) => k.startsWith('messages.'))

  it('the pages\' index of messages is the English file\'s messages namespace, word for word', () => {
    expect(Object.fromEntries(messages.map(([k, v]) => [k.slice('messages.'.length), v]))).toEqual(MESSAGE_TEXTS)
  })

  it.each(messages)('%s is a message the code sends', (_key, english) => {
    // plainTextMessage('name') builds its message from the field name; every other message is literal.
    const literal = english.replace(/^Name may not/, 'may not')
    expect(source.includes(literal), english).toBe(true)
  })

  // The refusals translated by their code (composables/localMessage.ts codeMessage): each code is one the
  // server really answers with, and each placeholder is a figure its answer carries.
  const codes = [...en.get('app.json')!].filter(([k]) => k.startsWith('serverCodes.'))
  it.each(codes)('%s is a code the server answers with', (key, english) => {
    const code = key.slice('serverCodes.'.length)
    expect(source.includes(`'${code}'`), code).toBe(true)
    for (const name of placeholders(english)) expect(source.includes(name ?? ""), `${code} carries ${name}`).toBe(true)
  })
})
