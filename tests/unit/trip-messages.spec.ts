import { readdirSync, readFileSync } from 'node:fs'
import { join } from 'node:path'
import { describe, expect, it } from 'vitest'
import { LOCALE_CODES, LOCALE_FILES } from '../../shared/i18n/locales'
import { tripFieldMessage } from '../../shared/i18n/tripFieldMessages'
import { ParticipantBody, passportExpiryProblem } from '../../shared/schemas/participants'
import { BookingCreate } from '../../shared/schemas/trips'

// The traveller's trip pages speak four languages from i18n/locales/<code>/trip.json.
const root = join(__dirname, '..', '..')
type Tree = { [k: string]: string | Tree }
const load = (code: string): Tree => JSON.parse(readFileSync(join(root, 'i18n', 'locales', code, 'trip.json'), 'utf8'))
function flat(t: Tree, prefix = ''): Record<string, string> {
  return Object.fromEntries(Object.entries(t).flatMap(([k, v]) => (typeof v === 'string' ? [[prefix + k, v]] : Object.entries(flat(v, `${prefix}${k}.`)))))
}
const en = flat(load('en'))
const placeholders = (s: string) => [...s.matchAll(/\{(\w+)\}/g)].map((m) => m[1]).sort()
const get = (tree: Record<string, string>, key: string) => tree[key]
/** vue-i18n's named interpolation, enough for these messages (no plurals used here). */
const say = (msg: string, params: Record<string, string>) => msg.replace(/\{(\w+)\}/g, (_, k: string) => params[k] ?? `{${k}}`)

describe('trip.json', () => {
  it('is one of the message files every locale loads', () => {
    expect(LOCALE_FILES).toContain('trip.json')
  })

  it.each(LOCALE_CODES.filter((c) => c !== 'en'))('%s has exactly the English keys, the same placeholders and plural forms, and no empty text', (code) => {
    const other = flat(load(code))
    expect(Object.keys(other).sort()).toEqual(Object.keys(en).sort())
    for (const [k, v] of Object.entries(en)) {
      expect(placeholders(other[k]!), k).toEqual(placeholders(v))
      expect(other[k]!.split(' | ').length, k).toBe(v.split(' | ').length)
      expect(other[k]!.trim(), k).not.toBe('')
    }
  })

  it.each(LOCALE_CODES.filter((c) => c !== 'en'))('%s has no English sentence left untranslated', (code) => {
    const other = flat(load(code))
    // Short labels may be the same word (Status, Mars, UTC); a sentence the same as English is a miss.
    const words = (v: string) => v.replace(/\{\w+\}/g, '').split(/\s+/).filter((w) => /^\p{L}{2,}/u.test(w)).length
    const same = Object.entries(en).filter(([k, v]) => words(v) >= 3 && other[k] === v).map(([k]) => k)
    expect(same).toEqual([])
  })

  it('keeps the trade names each language uses for the contacts, Baily\'s beads and the diamond ring', () => {
    const de = flat(load('de')), es = flat(load('es')), fr = flat(load('fr'))
    for (const t of [en, de, es, fr]) for (const c of ['c1', 'c2', 'c3', 'c4']) expect(get(t, `trip.phase.total.${c}`)).toMatch(new RegExp(`^${c.toUpperCase()}\\b`))
    expect(get(de, 'briefing.step.beads.title')).toBe('Perlschnurphänomen und Diamantring')
    expect(get(es, 'briefing.step.beads.title')).toBe('Perlas de Baily y anillo de diamante')
    expect(get(fr, 'briefing.step.beads.title')).toBe('Grains de Baily et anneau de diamant')
  })

  it('every key the trip pages ask for by name exists', () => {
    const files = ['pages/trips/index.vue', 'pages/trips/[id]/index.vue', 'pages/bookings/index.vue', 'pages/bookings/[id].vue',
      'pages/trips/[id]/briefing.vue', 'pages/trips/[id]/countdown/[siteId].vue', 'pages/ack/[token].vue', 'composables/useTripFormat.ts',
      ...readdirSync(join(root, 'components', 'briefing')).map((f) => `components/briefing/${f}`),
      'components/participants/ParticipantsSeatForm.vue', 'components/decision/DecisionBanner.vue', 'components/trips/TripsStatusChip.vue', 'components/operations/OperationsBookingMessages.vue']
    const namespaces = new Set(Object.keys(en).map((k) => k.split('.')[0]))
    const missing: string[] = []
    let asked = 0
    for (const f of files) {
      const src = readFileSync(join(root, f), 'utf8')
      // Whole keys asked of t/$t/te or <i18n-t keypath>: 'booking.paid'; keys built from a template keep their fixed prefix: `trip.status.${s}`.
      for (const m of src.matchAll(/(?:\$t\(|\bt\(|\bte\(|keypath=")\s*['"`]([a-z]+(?:\.[\w-]+)+)(\.\$\{|['"`])/g)) {
        const key = m[1]!, dynamic = m[2] === '.${'
        if (!namespaces.has(key.split('.')[0]!)) continue
        asked++
        const ok = dynamic ? Object.keys(en).some((k) => k.startsWith(`${key}.`)) : key in en
        if (!ok) missing.push(`${f}: ${key}`)
      }
    }
    expect(asked).toBeGreaterThan(150)
    expect(missing).toEqual([])
  })
})

describe('field messages on the booking box and the participant forms', () => {
  // Every message the schemas and the server give these forms, from real bad input.
  const bad = ParticipantBody.safeParse({
    fullName: 'A\tB', dateOfBirth: '1990-13-01', nationality: 'XX', passportNumber: '!!', passportExpiry: 'soon',
    mobilePhone: '0123', dietary: 'x'.repeat(1001), emergencyContact: { phone: '+99 1' }, room: { type: 'suite' },
  })
  const schemaMessages = bad.success ? [] : bad.error.issues.map((i) => i.message)
  const seatMessages = [0, 1.5, 999].flatMap((seats) => { const r = BookingCreate.safeParse({ seats }); return r.success ? [] : r.error.issues.map((i) => i.message) })
  const serverMessages = [passportExpiryProblem('2027-09-30', '2027-08-05')!, 'A date of birth cannot be in the future', 'Check the year of birth']

  it('finds the messages it is meant to translate', () => {
    expect(schemaMessages.length).toBeGreaterThanOrEqual(8)
    expect(seatMessages.length).toBeGreaterThanOrEqual(3)
  })

  it.each([...new Set([...schemaMessages, ...seatMessages, ...serverMessages])])('recognises "%s", and its English key says it again word for word', (msg) => {
    const known = tripFieldMessage(msg)
    expect(known, msg).not.toBeNull()
    const text = get(en, `participant.error.${known!.key}`)
    expect(text).toBeDefined()
    // The control-character message names its field in English; the translated one says "this field".
    if (known!.key !== 'controlChars') expect(say(text!, known!.params)).toBe(msg)
  })

  it('leaves a message it does not know alone', () => {
    expect(tripFieldMessage('Something else went wrong')).toBeNull()
  })
})
