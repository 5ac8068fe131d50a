import { isLocale, languageTag } from '../i18n/locales'
import { rawMessage, translator } from '../i18n/translate'
import { DEFAULT_CHECKLIST } from '../schemas/trips'

/**
 * A site's briefing in the reader's language, for documents made on the server (the briefing PDF).
 * The briefing service builds English sentences; other languages say each step from its key and the
 * same facts, with the messages the briefing page uses (i18n/locales/<code>/trip.json, `briefing.*`):
 * the clock position of a contact on the Sun's disc, the shadow's direction, the duration, the
 * dark-sky objects. English is returned exactly as built. An organiser's own "what to bring" list
 * stays as written.
 */
export interface BriefingForWords {
  kind: 'total' | 'annular' | 'partial' | 'none'
  durationSec: number
  steps: Array<{ key: string; title: string; text: string }>
  notice: string | null
  stepFacts: { clock: Partial<Record<'c1' | 'c2' | 'c3', number>>; shadowFrom: string | null }
  sky: { objects: Array<{ name: string; altitudeDeg: number; azimuthDeg: number }> }
  corona: { words: string; shape: string; caveat: string; phase: string; yearsFromExtreme: number; nearest: { kind: string; month: string; predicted: boolean } } | null
  weather: { words: string; pClear: number | null; cloudPct: number | null }
  checklist: string[]
}

const ENGLISH_COMPASS = ['north', 'north-northeast', 'northeast', 'east-northeast', 'east', 'east-southeast', 'southeast', 'south-southeast',
  'south', 'south-southwest', 'southwest', 'west-southwest', 'west', 'west-northwest', 'northwest', 'north-northwest']

/** A planet's or bright star's name as the language writes it (most stars' proper names are the same everywhere). */
export function skyNameIn(name: string, locale: string | null | undefined): string {
  if (!isLocale(locale) || locale === 'en') return name
  const key = `briefing.sky.name.${name.replace(/ /g, '_')}`
  return rawMessage(locale, key) !== undefined ? translator(locale)(key) : name
}

export function briefingWordsIn(b: BriefingForWords, locale: string | null | undefined) {
  const english = { steps: b.steps.map((s) => ({ title: s.title, text: s.text })), notice: b.notice, corona: b.corona ? `${b.corona.words} ${b.corona.shape} ${b.corona.caveat}` : null, weather: b.weather.words, checklist: b.checklist }
  if (!isLocale(locale) || locale === 'en') return english
  const t = translator(locale)
  const has = (key: string) => rawMessage(locale, key) !== undefined
  const number = (n: number, digits = 0) => new Intl.NumberFormat(languageTag(locale), { minimumFractionDigits: digits, maximumFractionDigits: digits }).format(n)
  const duration = (sec: number) => { const s = Math.round(sec), min = Math.floor(s / 60); return t('trip.duration.minSec', { min: number(min), sec: number(s - min * 60) }) }
  const compass = (deg: number) => t(`trip.compass.${Math.round((((deg % 360) + 360) % 360) / 22.5) % 16}`)
  const skyName = (name: string) => skyNameIn(name, locale)
  const noticeText = (n: string | null) => (!n ? '' : n.startsWith('Totality here is too short to remove filters safely') ? t('briefing.tooShortNotice') : n)
  const where = (k: 'c1' | 'c2' | 'c3') => { const h = b.stepFacts.clock[k]; return h ? t(`briefing.clock.${h}`, { h }) : '' }
  const fromIdx = b.stepFacts.shadowFrom ? ENGLISH_COMPASS.indexOf(b.stepFacts.shadowFrom) : -1
  const params: Record<string, string> = {
    where: '', duration: duration(b.durationSec ?? 0),
    from: fromIdx >= 0 ? t(`trip.compass.${fromIdx}`) : t('trip.compass.12'), to: fromIdx >= 0 ? t(`trip.compass.${(fromIdx + 8) % 16}`) : t('trip.compass.4'),
    corona: b.corona ? t(`briefing.corona.shape.${b.corona.phase}`) : t('briefing.corona.default'),
    sky: b.sky.objects.map((o) => t('briefing.sky.objectUp', { name: skyName(o.name), alt: number(o.altitudeDeg), dir: compass(o.azimuthDeg) })).join('; '),
    notice: noticeText(b.notice),
  }
  const steps = b.steps.map((s) => {
    const base = `briefing.step.${s.key}${s.key === 'maximum' || s.key === 'light' ? `.${b.kind}` : ''}`
    const p = { ...params }
    if (s.key === 'partial-begins' || s.key === 'c3') p.where = where(s.key === 'c3' ? 'c3' : 'c1')
    if (s.key === 'beads' || s.key === 'chromosphere') p.where = where('c2')
    const textKey = p.where && has(`${base}.textWhere`) ? `${base}.textWhere` : `${base}.text`
    return { title: has(`${base}.title`) ? t(`${base}.title`) : s.title, text: has(textKey) ? t(textKey, p).trim() : s.text }
  })
  const c = b.corona
  const corona = c
    ? `${t(`briefing.corona.phase.${c.phase}`, { when: t(`briefing.corona.${c.yearsFromExtreme >= 0 ? 'after' : 'before'}.${c.nearest.predicted ? 'expected' : 'past'}.${c.nearest.kind}`, { years: number(Math.abs(c.yearsFromExtreme), 1), month: c.nearest.month }) })} ${t(`briefing.corona.shape.${c.phase}`)} ${t('briefing.corona.caveat')}`
    : null
  const weather = b.weather.pClear === null ? t('briefing.weather.none') : t('briefing.weather.history', { clear: number(Math.round(b.weather.pClear * 100)), cloud: number(Math.round(b.weather.cloudPct ?? 0)) })
  const isDefault = b.checklist.length === DEFAULT_CHECKLIST.length && b.checklist.every((x, i) => x === DEFAULT_CHECKLIST[i])
  const checklist = isDefault ? DEFAULT_CHECKLIST.map((_, i) => t(`briefing.checklist.${i}`)) : b.checklist
  return { steps, notice: b.notice ? noticeText(b.notice) : null, corona, weather, checklist }
}
