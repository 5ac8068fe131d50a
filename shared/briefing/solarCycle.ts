/**
 * The phase of the solar cycle on a date, and what the corona tends to look like then. A briefing,
 * not a prediction: the corona's shape on the day is not known in advance.
 *
 * Extremes of the 13-month smoothed sunspot number (month of the extreme):
 * - minima: 1996-05 (cycle 22/23), 2008-12 (23/24), 2019-12 (24/25) — the NASA/NOAA Solar Cycle 25
 *   Prediction Panel announced in September 2020 that cycle 25 began in December 2019; the earlier
 *   minima as listed by SILSO (Royal Observatory of Belgium), from memory.
 * - maxima: 2001-11 (cycle 23), 2014-04 (cycle 24) — SILSO, from memory; 2024-10 (cycle 25) — NASA
 *   and NOAA announced in October 2024 that the Sun had reached its maximum period; the smoothed peak
 *   month is from memory and may still be revised by a few months.
 * - the next minimum (cycle 25/26) is not yet observed: taken as 2030-12, about eleven years after the
 *   last, from memory of the panel's range (2029–2032); dates after it are beyond what this table knows.
 */
export const SOLAR_CYCLE_EXTREMES: ReadonlyArray<{ kind: 'minimum' | 'maximum'; month: string; source: string; predicted?: boolean }> = [
  { kind: 'minimum', month: '1996-05', source: 'SILSO smoothed sunspot number (from memory)' },
  { kind: 'maximum', month: '2001-11', source: 'SILSO smoothed sunspot number (from memory)' },
  { kind: 'minimum', month: '2008-12', source: 'SILSO smoothed sunspot number (from memory)' },
  { kind: 'maximum', month: '2014-04', source: 'SILSO smoothed sunspot number (from memory)' },
  { kind: 'minimum', month: '2019-12', source: 'NASA/NOAA Solar Cycle 25 Prediction Panel, September 2020' },
  { kind: 'maximum', month: '2024-10', source: 'NASA/NOAA announcement of solar maximum, October 2024 (peak month from memory)' },
  { kind: 'minimum', month: '2030-12', source: 'expected, about eleven years after the last minimum (from memory of the panel’s range)', predicted: true },
]

export type CyclePhase = 'near-minimum' | 'near-maximum' | 'rising' | 'declining'

export interface Corona {
  phase: CyclePhase
  /** Years from the nearest listed extreme (negative: before it). */
  yearsFromExtreme: number
  nearest: { kind: 'minimum' | 'maximum'; month: string; source: string; predicted: boolean }
  /** One sentence on the corona's usual shape in this phase. */
  shape: string
  words: string
  caveat: string
}

const yearsOf = (iso: string) => {
  const d = new Date(iso.length === 7 ? `${iso}-15T00:00:00Z` : `${iso.slice(0, 10)}T00:00:00Z`)
  return d.getUTCFullYear() + (d.getTime() - Date.UTC(d.getUTCFullYear(), 0, 1)) / (365.25 * 86_400_000)
}

/** Within this many years of an extreme counts as "near" it. */
export const NEAR_YEARS = 1.5

const SHAPES: Record<CyclePhase, string> = {
  'near-maximum': 'Near solar maximum the corona is usually round, with streamers reaching out all around the Sun.',
  'near-minimum': 'Near solar minimum the corona usually shows long streamers along the Sun’s equator and short, fine plumes at its poles.',
  rising: 'Between minimum and maximum the corona usually mixes the two: streamers at many latitudes, with some polar plumes still visible.',
  declining: 'Between maximum and minimum the corona usually mixes the two: streamers gathering towards the equator, with polar plumes starting to show.',
}

/** The cycle phase on a date (YYYY-MM-DD), or null outside the table (before 1996 or after the expected next minimum). */
export function coronaOn(date: string): Corona | null {
  const y = yearsOf(date)
  const list = SOLAR_CYCLE_EXTREMES.map((e) => ({ ...e, y: yearsOf(e.month), predicted: !!e.predicted }))
  if (y < list[0]!.y || y > list[list.length - 1]!.y) return null
  const nearest = list.reduce((a, b) => (Math.abs(b.y - y) < Math.abs(a.y - y) ? b : a))
  const next = list.find((e) => e.y > y)!
  let phase: CyclePhase
  if (Math.abs(nearest.y - y) <= NEAR_YEARS) phase = nearest.kind === 'maximum' ? 'near-maximum' : 'near-minimum'
  else phase = next.kind === 'maximum' ? 'rising' : 'declining'
  const yearsFromExtreme = Math.round((y - nearest.y) * 10) / 10
  const when = `${Math.abs(yearsFromExtreme).toFixed(1)} years ${yearsFromExtreme >= 0 ? 'after' : 'before'} the ${nearest.predicted ? 'expected ' : ''}solar ${nearest.kind} of ${nearest.month}`
  const words = {
    'near-maximum': `The eclipse falls near solar maximum (${when}).`,
    'near-minimum': `The eclipse falls near solar minimum (${when}).`,
    rising: `The eclipse falls while solar activity is rising (${when}).`,
    declining: `The eclipse falls while solar activity is declining (${when}).`,
  }[phase]
  return {
    phase, yearsFromExtreme, nearest: { kind: nearest.kind, month: nearest.month, source: nearest.source, predicted: nearest.predicted },
    shape: SHAPES[phase], words,
    caveat: 'This is a briefing, not a prediction: each corona is different, and its shape on the day is only known when it is seen.',
  }
}
