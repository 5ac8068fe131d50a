import { createRequire } from 'node:module'
import PDFDocument from 'pdfkit'
import { shipZoneLabel } from '../../../shared/time/shipZone'
import { localAndUtcLine, shownInstant, utcClock } from '../../../shared/time/local'
import { nowIso } from '../clock'
import type { getVoyage } from './voyages'

export type VoyageOut = Awaited<ReturnType<typeof getVoyage>>

const fontPath = (weight: 400 | 600 | 700) => createRequire(import.meta.url).resolve(`@fontsource/work-sans/files/work-sans-latin-${weight}-normal.woff`)

/** The embedded latin subset of Work Sans has no Greek or astronomical symbols: spell them out. */
const plain = (t: string) => t.replace(/σ/g, 'sigma').replace(/ΔT/g, 'delta-T').replace(/Δ/g, 'delta ').replace(/☉/g, 'Sun').replace(/″/g, '"').replace(/′/g, "'").replace(/−/g, '-').replace(/–/g, '-')

const INK = '#1a1633', MUTED = '#62579b', RED = '#a8362d', SEA = '#1d5f8a'
const ANCHORS = ['c1', 'c2', 'max', 'c3', 'c4'] as const

/** 36.1234 → "36° 07.40' N" (degrees and decimal minutes, as read off a chart plotter). */
export function degMin(value: number, pos: string, neg: string, degWidth: number): string {
  const a = Math.abs(value)
  let d = Math.floor(a)
  let m = Math.round((a - d) * 60 * 100) / 100
  if (m >= 60) { d += 1; m = 0 }
  return `${String(d).padStart(degWidth, '0')}° ${m.toFixed(2).padStart(5, '0')}' ${value < 0 ? neg : pos}`
}
export const position = (lat: number, lon: number) => `${degMin(lat, 'N', 'S', 2)}, ${degMin(lon, 'E', 'W', 3)} (${lat.toFixed(4)}°, ${lon.toFixed(4)}°)`

/**
 * A voyage's contact timetable as a PDF (A4 or US Letter, Work Sans embedded): the intercept, the
 * departure and route, contacts C1–C4 and maximum in ship's time (the zone of the intercept) and UTC,
 * each pair formatted from one rounding (shared/time/local.ts), Sun altitude and azimuth, the filter
 * cues, the under-way contacts and cues when the plan holds a course, the alternatives, and eye safety.
 */
export function voyagePdf(v: VoyageOut, paper: 'a4' | 'letter'): Promise<Buffer> {
  const doc = new PDFDocument({ size: paper === 'letter' ? 'LETTER' : 'A4', margin: 42, info: { Title: `${v.name} — voyage timetable`, Author: 'Umbrafield' } })
  doc.registerFont('ws', fontPath(400))
  doc.registerFont('ws-semi', fontPath(600))
  doc.registerFont('ws-bold', fontPath(700))
  const chunks: Buffer[] = []
  doc.on('data', (c: Buffer) => chunks.push(c))
  const done = new Promise<Buffer>((resolve) => doc.on('end', () => resolve(Buffer.concat(chunks))))
  const tt = v.timetable
  const zone = tt.zone
  const left = doc.page.margins.left
  const width = doc.page.width - left - doc.page.margins.right
  const bottom = doc.page.height - doc.page.margins.bottom
  const room = (h: number) => { if (doc.y + h > bottom) { doc.addPage(); doc.y = doc.page.margins.top } }
  const ship = (utc: string) => shownInstant(utc, zone)
  const offset = tt.contacts.max?.utcOffset ?? ship(v.intercept.utc).utcOffset
  const heading = (text: string) => { room(40); doc.font('ws-bold').fontSize(12).fillColor(INK).text(text, left, doc.y + 8, { width }); doc.moveDown(0.2) }

  doc.font('ws-semi').fontSize(8).fillColor(MUTED).text('UMBRAFIELD · VOYAGE TIMETABLE · AT SEA', left, 40)
  doc.font('ws-bold').fontSize(18).fillColor(INK).text(v.name, left, 54, { width })
  doc.font('ws').fontSize(10).fillColor(INK).text(`Eclipse of ${v.eclipseId} · ${tt.words.eclipseName}`, { width })
  doc.font('ws-semi').fontSize(10).fillColor(SEA).text(plain(`Ship's time: ${shipZoneLabel(zone, offset)}.`), { width })
  doc.font('ws').fontSize(8.5).fillColor(MUTED).text('If the ship keeps another clock on board, read the UTC column and convert.', { width })
  doc.moveDown(0.5)

  // Intercept and passage
  const dep = ship(v.departBy)
  const facts: Array<[string, string]> = [
    ['Intercept', position(v.intercept.lat, v.intercept.lon)],
    ['At the intercept', plain(`${tt.words.central ? `${v.intercept.durationSec} s of ${tt.words.central}` : 'no central phase'}, the Sun ${v.intercept.sunAltitudeDeg}° high at maximum${v.intercept.pClear !== null ? `, P(clear) ${Math.round(v.intercept.pClear * 100)} %, ${v.intercept.expectedSec} expected seconds` : ''} (ship lying stopped)`)],
    ['Departure', `${position(v.departure.lat, v.departure.lon)}, planned ${v.departure.utc.slice(0, 16).replace('T', ' ')} UTC, ${v.speedKn} knots`],
    ['Leave by', `${dep.local.slice(0, 16)} ship's time · ${dep.utcIso.slice(0, 16).replace('T', ' ')} UTC, to arrive ${v.method.arrivalMarginMin} minutes before C1`],
    ['Route', `${v.distanceNm} nm on water, keeping ${v.method.coastalMarginKm} km off the coast${v.homeward ? `; homeward ${v.homeward.distanceNm} nm` : ''}`],
  ]
  for (const [k, text] of facts) {
    const y = doc.y
    doc.font('ws-semi').fontSize(9).fillColor(MUTED).text(k.toUpperCase(), left, y, { width: 100 })
    doc.font('ws').fontSize(10).fillColor(INK).text(text, left + 105, y, { width: width - 105 })
    doc.y = Math.max(doc.y, y + 12) + 3
  }

  // Contacts, ship lying stopped at the intercept
  heading('Contacts at the intercept (ship lying stopped)')
  const cols = [0, 160, 250, 330, 385, 440]
  const header = (labels: string[], at: number[]) => {
    const y = doc.y + 2
    doc.font('ws-semi').fontSize(8).fillColor(MUTED)
    labels.forEach((h, i) => doc.text(h, left + at[i]!, y, { lineBreak: false }))
    doc.y = y + 13
  }
  const rule = (y: number) => doc.moveTo(left, y - 3).lineTo(left + width, y - 3).lineWidth(0.4).strokeColor('#d2cee8').stroke()
  /** One contact's row: its name, ship's time and UTC, then the figures of this table (text, with a smaller size where given). */
  const contactRow = (k: (typeof ANCHORS)[number], utc: string, at: number[], figures: Array<{ text: string; size?: number }>) => {
    room(16)
    const y = doc.y
    rule(y)
    const s = ship(utc)
    doc.font(k === 'c2' || k === 'c3' ? 'ws-bold' : 'ws').fontSize(10).fillColor(INK)
    doc.text(plain(tt.words.contact[k]), left + at[0]!, y, { width: at[1]! - 6, lineBreak: false, ellipsis: true })
    doc.text(s.localClock, left + at[1]!, y, { lineBreak: false })
    doc.font('ws').text(s.utc, left + at[2]!, y, { lineBreak: false })
    figures.forEach((f, i) => doc.fontSize(f.size ?? 10).text(f.text, left + at[i + 3]!, f.size ? y + 1 : y, { lineBreak: false }))
    doc.y = y + 16
  }
  header(["CONTACT", "SHIP'S TIME", 'UTC', '±', 'SUN ALT', 'SUN AZ'], cols)
  for (const k of ANCHORS) {
    const c = tt.contacts[k]
    if (c) contactRow(k, c.utc, cols, [{ text: `${c.uncertaintySec.toFixed(1)} s` }, { text: `${c.altitudeDeg.toFixed(1)}°` }, { text: `${c.azimuthDeg.toFixed(0)}°` }])
  }
  cues('Filter cues (ship lying stopped)', tt.cues, tt.notice)

  // Under way: the course held through the eclipse
  if (v.underway && tt.underway) {
    const u = tt.underway
    heading(plain(`Keeping way: heading ${v.underway.headingDeg}° true at ${v.underway.speedKn} knots through maximum`))
    doc.font('ws').fontSize(9.5).fillColor(INK).text(plain(`${tt.words.central ? `${v.underway.durationSec} s of ${tt.words.central} (${v.underway.gainSec >= 0 ? '+' : ''}${v.underway.gainSec} s against lying stopped)` : 'no central phase under way'}. The ship passes the intercept at maximum.`), left, doc.y, { width })
    doc.moveDown(0.3)
    const ucols = [0, 160, 250, 330, 445]
    header(["CONTACT", "SHIP'S TIME", 'UTC', 'SHIP AT', 'SUN ALT'], ucols)
    for (const k of ANCHORS) {
      const c = u.contacts[k]
      if (c) contactRow(k, c.utc, ucols, [{ text: `${c.lat.toFixed(3)}°, ${c.lon.toFixed(3)}°`, size: 8.5 }, { text: `${c.sunAltitudeDeg.toFixed(1)}°` }])
    }
    cues('Filter cues (keeping way)', u.cues, u.notice)
  }

  // Alternatives
  if (v.alternatives.length) {
    heading('If cloud builds: other reachable points')
    for (const [i, a] of v.alternatives.entries()) {
      room(14)
      const s = ship(a.departBy)
      doc.font('ws').fontSize(9).fillColor(INK).text(plain(`${i + 1}. ${position(a.lat, a.lon)} — ${a.durationSec} s, ${a.expectedSec} expected s, ${a.distanceNm} nm, leave by ${s.local.slice(0, 16)} ship's time (${s.utc.slice(0, 5)} UTC)`), left, doc.y + 1, { width })
    }
  }

  // Eye safety
  room(110)
  const boxTop = doc.y + 10
  doc.font('ws-bold').fontSize(10).fillColor(RED).text('Eye safety', left + 10, boxTop + 8)
  doc.font('ws').fontSize(9).fillColor(INK)
  for (const line of tt.safety) doc.text(plain(`• ${line}`), left + 10, doc.y + 2, { width: width - 20 })
  doc.rect(left, boxTop, width, doc.y - boxTop + 8).lineWidth(1).strokeColor(RED).stroke()
  room(60)
  doc.font('ws').fontSize(7.5).fillColor(MUTED).text(
    plain(`${localAndUtcLine(tt.time.line, { zone, utcOffset: offset }).replace("the site's clock", "ship's time")} Elements: ${tt.elementsSource}. ± ${tt.uncertaintyMethod}. `
      + `Routes are a planning aid, not a navigation chart (a ${v.method.gridStepDeg}° grid over ${v.method.land}): the master decides the passage. `
      + `Generated ${nowIso().slice(0, 16).replace('T', ' ')} UTC.`),
    left, doc.y + 14, { width },
  )
  doc.end()
  return done

  function cues(title: string, list: typeof tt.cues, notice: string | null) {
    heading(title)
    if (notice) { doc.font('ws-bold').fontSize(10).fillColor(RED).text(notice, left, doc.y, { width }); doc.moveDown(0.3) }
    for (const c of list) {
      room(26)
      const y = doc.y
      const s = ship(c.utc)
      doc.font('ws-semi').fontSize(10).fillColor(c.filters === 'off' ? RED : INK).text(s.localClock, left, y, { width: 60 })
      doc.font('ws').fontSize(8).fillColor(MUTED).text(`UTC ${utcClock(c.utc)}`, left, y + 12, { width: 62 })
      doc.font(c.filters === 'off' ? 'ws-bold' : 'ws').fontSize(10).fillColor(INK).text(plain(`${c.label}  [filters ${c.filters}]`), left + 70, y, { width: width - 70 })
      doc.y = Math.max(doc.y, y + 22) + 4
    }
  }
}
