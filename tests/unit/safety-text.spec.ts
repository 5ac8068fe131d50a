import { describe, expect, it } from 'vitest'
import { itinerary } from '../../server/services/mailTemplates'
import { DEFAULT_CHECKLIST } from '../../shared/schemas/trips'
import { phaseWords, safetyLines, safetyParagraph } from '../../shared/safety/text'

// The one safety text must cover what common practice asks of eclipse safety notes (from memory of
// AAS/IAU guidance): ISO 12312-2 viewers for direct viewing, purpose-made filters on the front of
// optics, inspection, children, no naked eye on partial or annular phases, local rules and advice.
describe('the safety text', () => {
  it.each([undefined, 'total', 'annular', 'partial'] as const)('covers every point (%s)', (kind) => {
    const t = safetyLines(kind).join(' ')
    expect(t).toMatch(/ISO 12312-2/)
    expect(t).toMatch(/direct look at the Sun/)
    expect(t).toMatch(/solar filter over its front end/)
    expect(t).toMatch(/each viewer and filter/)
    expect(t).toMatch(/Young observers/)
    expect(t).toMatch(/Never watch an annular or partial phase with the naked eye/)
    expect(t).toMatch(/Local rules and qualified advice come first\.$/)
    // ISO 12312-2 is named for viewers only, never as the standard for filters on optics.
    expect(t).not.toMatch(/ISO 12312-2[^.]*filters/)
  })
  it('annular and partial sites keep filters on throughout and never say "totality"', () => {
    for (const kind of ['annular', 'partial'] as const) {
      const all = JSON.stringify([safetyLines(kind), phaseWords(kind), safetyParagraph(kind)])
      expect(all).not.toMatch(/totality/i)
      expect(safetyLines(kind).join(' ')).toMatch(/keep viewers and filters on throughout/)
    }
    expect(phaseWords('annular').contact.c2).toBe('C2 — annularity begins')
    expect(phaseWords('total').contact.c2).toBe('C2 — totality begins')
  })
  it('an annular itinerary e-mail says annularity, keeps filters on and never says totality', () => {
    const words = phaseWords('annular')
    const m = itinerary({
      name: 'Demo', tripTitle: 'Ring trip', seats: 1, currency: 'usd', priceMinor: 100, paidMinor: 10, dueMinor: 90, bookingUrl: 'http://x/b/1',
      meeting: { name: 'Lobby', local: '2027-02-06 10:00:00', utcOffset: '-03:00', zone: 'America/Montevideo' },
      site: { name: 'Punta del Este', lat: -34.96, lon: -54.94, mapUrl: 'http://x/t/2', zone: 'America/Montevideo' },
      contacts: (['c1', 'c2', 'max', 'c3', 'c4'] as const).map((k) => ({ label: words.contact[k], local: '12:00:00', utc: '15:00:00' })),
      eclipseKind: 'annular', centralName: 'Annularity', durationSec: 335, timeLine: 'Times are UTC.', bring: DEFAULT_CHECKLIST, briefingUrl: 'http://localhost:3000/trips/2/briefing',
      organiser: { name: 'O', email: 'o@x.test' },
    })
    for (const body of [m.text, m.html]) {
      expect(body).toMatch(/annularity begins/)
      expect(body).toMatch(/Annularity: 335 s/)
      expect(body).toMatch(/keep viewers and filters on throughout/)
      expect(body).not.toMatch(/totality/i)
    }
  })
})
