import { describe, expect, it } from 'vitest'
import { LOCALE_CODES } from '../../shared/i18n/locales'
import { rawMessage, translate } from '../../shared/i18n/translate'
import { phaseWords, safetyLines, safetyParagraph } from '../../shared/safety/text'

const KINDS = [undefined, 'total', 'annular', 'partial'] as const
const OTHERS = LOCALE_CODES.filter((c) => c !== 'en')

// The safety text is complete in every language: the same lines for each kind, none empty, none
// left in English, and ISO 12312-2 named wherever the English names it (viewers, never optics).
describe('the safety text in every language', () => {
  for (const locale of OTHERS) {
    it.each(KINDS)(`${locale}: every line of kind %s is written in ${locale}`, (kind) => {
      const en = safetyLines(kind, 'en')
      const lines = safetyLines(kind, locale)
      expect(lines).toHaveLength(en.length)
      lines.forEach((line, i) => {
        expect(line.trim().length).toBeGreaterThan(10)
        expect(line).not.toBe(en[i])
        if (en[i]!.includes('ISO 12312-2')) expect(line).toContain('ISO 12312-2')
        else expect(line).not.toContain('ISO 12312-2')
      })
      // Each line comes from the locale's own file, not from the English fallback.
      for (const key of ['viewer', 'optics', 'inspect', 'children', 'nakedEye', 'filtersTotal', 'filtersKept', 'filtersGeneral', 'final', 'title', 'heading', 'paragraph']) {
        const path = ['title', 'heading', 'paragraph'].includes(key) ? `safety.${key}` : `safety.lines.${key}`
        expect(rawMessage(locale, path), `${locale} ${path}`).toBeTruthy()
      }
      expect(safetyParagraph(kind, locale)).toContain(lines.join(' '))
      expect(safetyParagraph(kind, locale)).not.toContain('Eye safety')
    })

    it(`${locale}: phase words exist for every kind and an annular or partial site never names totality`, () => {
      const totality = phaseWords('total', locale).central!
      expect(totality).not.toBe(phaseWords('total', 'en').central)
      for (const kind of ['total', 'annular', 'partial'] as const) {
        const w = phaseWords(kind, locale)
        const e = phaseWords(kind, 'en')
        expect(w.eclipseName).not.toBe(e.eclipseName)
        for (const k of ['c1', 'c2', 'max', 'c3', 'c4'] as const) {
          // The contact names C1–C4 keep their trade names in every language.
          if (k !== 'max') expect(w.contact[k].startsWith(k.toUpperCase())).toBe(true)
        }
        expect(w.contact.max).not.toBe(e.contact.max)
        if (kind !== 'total') expect(JSON.stringify([w, safetyLines(kind, locale)]).toLowerCase()).not.toContain(totality.toLowerCase())
      }
    })
  }

  it('English stays as it was written', () => {
    expect(safetyLines('total')[0]).toBe('Any direct look at the Sun goes through an ISO 12312-2 eclipse viewer (card glasses or a hand-held viewer).')
    expect(safetyParagraph('partial')).toMatch(/^Eye safety: Any direct look/)
    expect(phaseWords('annular').contact.c2).toBe('C2 — annularity begins')
  })
})

// The translator follows vue-i18n's message syntax for what the message files use.
describe('translate', () => {
  it('fills named placeholders and literals, picks plural choices as vue-i18n does, and falls back to English', () => {
    expect(translate('de', 'safety.paragraph', { lines: 'X' })).toBe('Augenschutz: X')
    expect(translate('xx', 'safety.title')).toBe('Eye safety')
    expect(translate('de', 'no.such.key')).toBe('no.such.key')
  })
})

describe('cue labels in every language', () => {
  // A total site with C2 and C3 on the disc, a planet up and the shadow's bearing known.
  const input = (locale?: string) => ({
    kind: 'total' as const, locale, shadowFrom: 'west-southwest', shadowFromDeg: 250,
    planets: [{ name: 'Venus', altitudeDeg: 31.6, azimuthDeg: 100 }],
    contacts: {
      c1: { utcMs: 0, uncertaintySec: 1 }, c2: { utcMs: 3_600_000, uncertaintySec: 1, direction: "at upper right, about 2 o'clock", vertexAngleDeg: 300 },
      max: { utcMs: 3_700_000, uncertaintySec: 1 }, c3: { utcMs: 3_800_000, uncertaintySec: 1, direction: "at lower left, about 8 o'clock", vertexAngleDeg: 120 },
      c4: { utcMs: 7_200_000, uncertaintySec: 1 },
    },
  })
  it('English keeps its words; German, Spanish and French use their own and keep the trade names', async () => {
    const { planCues } = await import('../../shared/safety/cues')
    const en = planCues(input())
    expect(en.cues.find((c) => c.key === 'beads')!.label).toBe("Baily's beads — keep filters ON until the last bead has gone; the last light is at upper right, about 2 o'clock")
    expect(en.cues.find((c) => c.key === 'planets')!.label).toBe('Look for Venus 32° up in the E')
    const names = { de: ['Perlschnurphänomen', 'Diamantring', 'oben rechts, etwa bei 2 Uhr', 'Westsüdwest'], es: ['Perlas de Baily', 'anillo de diamante', 'arriba a la derecha, hacia las 2', 'oestesuroeste'], fr: ['Grains de Baily', 'anneau de diamant', 'en haut à droite, vers 2 heures', 'ouest-sud-ouest'] } as const
    for (const locale of ['de', 'es', 'fr'] as const) {
      const plan = planCues(input(locale))
      // The same cues at the same instants with the same filter states: only the words change.
      expect(plan.cues.map((c) => [c.key, c.utcMs, c.filters])).toEqual(en.cues.map((c) => [c.key, c.utcMs, c.filters]))
      const all = plan.cues.map((c) => c.label).join('\n')
      for (const w of names[locale]) expect(all).toContain(w)
      plan.cues.forEach((c, i) => expect(c.label).not.toBe(en.cues[i]!.label))
    }
  })
})
