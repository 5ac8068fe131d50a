import { localAndUtcLine, utcClock } from '../../shared/time/local'
import { createRequire } from 'node:module'
import PDFDocument from 'pdfkit'
import { skyDiagram } from '../../shared/briefing/skyDiagram'
import { briefingWordsIn, skyNameIn } from '../../shared/briefing/words'
import type { TripBriefing } from './briefing'
import type { timetable } from './timetable'
import { languageTag } from '../../shared/i18n/locales'
import { translator } from '../../shared/i18n/translate'
import { compassIn, contactPlaceIn } from '../../shared/safety/cues'
import { phaseWords, safetyLines, safetyTitle } from '../../shared/safety/text'

type Timetable = Awaited<ReturnType<typeof timetable>>

const fontPath = (weight: 400 | 600 | 700) => createRequire(import.meta.url).resolve(`@fontsource/work-sans/files/work-sans-latin-${weight}-normal.woff`)

/** The embedded latin subset of Work Sans has no Greek or astronomical symbols: spell them out. */
const plain = (t: string) => t.replace(/\u202f/g, '\u00a0').replace(/σ/g, 'sigma').replace(/ΔT/g, 'delta-T').replace(/Δ/g, 'delta ').replace(/☉/g, 'Sun').replace(/″/g, '"').replace(/′/g, "'").replace(/−/g, '-')

/** Numbers in the reader's language with a fixed count of decimals and no grouping (English reads as toFixed did). */
function numbers(locale?: string) {
  const cache = new Map<number, Intl.NumberFormat>()
  return (v: number, digits: number) => {
    if (!cache.has(digits)) cache.set(digits, new Intl.NumberFormat(languageTag(locale), { minimumFractionDigits: digits, maximumFractionDigits: digits, useGrouping: false }))
    return cache.get(digits)!.format(v)
  }
}

/** When the PDF was made: English keeps its ISO form; other languages read a date and time in their own format, in UTC. */
function generatedAt(iso: string, locale?: string): string {
  if (!locale || locale === 'en') return iso.slice(0, 16).replace('T', ' ')
  return new Intl.DateTimeFormat(languageTag(locale), { dateStyle: 'medium', timeStyle: 'short', timeZone: 'UTC' }).format(new Date(iso))
}

const INK = '#1a1633', MUTED = '#62579b', GOLD = '#d8901b', RED = '#a8362d'

/**
 * The contact timetable as a PDF: one page per site, A4 or US Letter, Work Sans embedded; each site's
 * page is followed by the participants' briefing for that site when `briefings` are given.
 */
export function timetablePdf(t: Timetable, paper: 'a4' | 'letter', briefings: TripBriefing[] = [], rooming?: RoomingEntry[], locale?: string): Promise<Buffer> {
  const tr = translator(locale)
  const fmt = numbers(locale)
  const doc = new PDFDocument({ size: paper === 'letter' ? 'LETTER' : 'A4', margin: 42, autoFirstPage: false, lang: languageTag(locale), info: { Title: tr('doc.pdf.title', { trip: t.trip.title }), Author: 'Umbrafield' } })
  doc.registerFont('ws', fontPath(400))
  doc.registerFont('ws-semi', fontPath(600))
  doc.registerFont('ws-bold', fontPath(700))
  const chunks: Buffer[] = []
  doc.on('data', (c: Buffer) => chunks.push(c))
  const done = new Promise<Buffer>((resolve) => doc.on('end', () => resolve(Buffer.concat(chunks))))
  for (const s of t.sites) {
    doc.addPage()
    const left = doc.page.margins.left
    const width = doc.page.width - left - doc.page.margins.right
    const words = phaseWords(s.kind, locale)
    doc.font('ws-semi').fontSize(8).fillColor(MUTED).text(tr(s.role === 'primary' ? 'doc.pdf.kickerPrimary' : 'doc.pdf.kickerBackup'), left, 40)
    const headW = width - 110
    doc.font('ws-bold').fontSize(18).fillColor(INK).text(s.name, left, 54, { width: headW })
    doc.font('ws').fontSize(10).fillColor(INK).text(tr('doc.pdf.tripLine', { trip: t.trip.title, eclipseId: t.trip.eclipseId }), { width: headW })
    doc.fillColor(MUTED).text(tr('doc.pdf.siteLine', { lat: fmt(s.lat, 4), lon: fmt(s.lon, 4), height: s.elevationSet ? tr('doc.pdf.heightM', { m: new Intl.NumberFormat(languageTag(locale), { maximumFractionDigits: 2, useGrouping: false }).format(s.elevationM) }) : tr('doc.pdf.heightNotSet'), zone: s.zone, offset: s.utcOffset }), { width: headW })
    if (s.role === 'backup') {
      const fb = { rank: s.chase.rank, count: t.sites.length - 1, km: fmt(s.chase.distanceKm, 0), primary: t.sites[0]!.name }
      doc.text(plain(s.chase.expectedSec !== null ? tr('doc.pdf.fallbackExpected', { ...fb, sec: fmt(s.chase.expectedSec, 0) }) : tr('doc.pdf.fallback', fb)), { width: headW })
    }
    doc.moveDown(0.4)
    const summary = { eclipse: words.eclipseName, mag: fmt(s.magnitude, 4), obs: fmt(s.obscuration * 100, 1) }
    doc.font('ws-semi').fontSize(11).fillColor(INK)
      .text(words.central ? tr('doc.pdf.summaryCentral', { ...summary, central: words.central, duration: s.durationSec ? tr('doc.pdf.duration', { min: Math.floor(s.durationSec / 60), sec: fmt(s.durationSec % 60, 1) }) : '—' }) : tr('doc.pdf.summary', summary), { width: headW })

    // Contacts table
    let y = doc.y + 8
    const cols = [0, 150, 250, 345, 405, 455]
    // Each column wraps inside its own width: labels run longer in some languages than in English.
    const colW = (i: number) => (i + 1 < cols.length ? cols[i + 1]! : width) - cols[i]! - 6
    doc.font('ws-semi').fontSize(8).fillColor(MUTED)
    const heads = [tr('doc.pdf.colContact'), tr('doc.pdf.colLocal'), 'UTC', '±', tr('doc.pdf.colSunAlt'), tr('doc.pdf.colSunAz')]
    heads.forEach((h, i) => doc.text(h, left + cols[i]!, y, { width: colW(i) }))
    y += Math.max(...heads.map((h, i) => doc.heightOfString(h, { width: colW(i) }))) + 3
    for (const k of ['c1', 'c2', 'max', 'c3', 'c4'] as const) {
      const c = s.contacts[k]
      if (!c) continue
      doc.moveTo(left, y - 3).lineTo(left + width, y - 3).lineWidth(0.4).strokeColor('#d2cee8').stroke()
      doc.font(k === 'c2' || k === 'c3' ? 'ws-bold' : 'ws').fontSize(10).fillColor(INK)
      const label = plain(words.contact[k])
      const labelH = doc.heightOfString(label, { width: colW(0) })
      doc.text(label, left + cols[0]!, y, { width: colW(0) })
      doc.text(c.local.slice(11), left + cols[1]!, y, { width: colW(1), lineBreak: false })
      doc.font('ws').text(utcClock(c.utc), left + cols[2]!, y, { width: colW(2), lineBreak: false })
      doc.text(`${fmt(c.uncertaintySec, 1)} s`, left + cols[3]!, y, { width: colW(3), lineBreak: false })
      doc.text(`${fmt(c.altitudeDeg, 1)}°`, left + cols[4]!, y, { width: colW(4), lineBreak: false })
      doc.text(`${fmt(c.azimuthDeg, 0)}°`, left + cols[5]!, y, { width: colW(5), lineBreak: false })
      y += Math.max(16, labelH + 4)
      if (c.direction) {
        const point = tr('doc.pdf.contactPoint', { dir: contactPlaceIn(c.direction, c.vertexAngleDeg, locale) ?? '', pa: c.positionAngleDeg === undefined ? '' : fmt(c.positionAngleDeg, 0), va: c.vertexAngleDeg === undefined ? '' : fmt(c.vertexAngleDeg, 0) })
        const pointW = width - cols[1]!
        doc.fontSize(8).fillColor(MUTED).text(point, left + cols[1]!, y - 3, { width: pointW })
        y += doc.heightOfString(point, { width: pointW }) + 1
      }
    }
    // Sun disc with the C2 and C3 points (vertex angles: measured from the top, counter-clockwise).
    const tableBottom = y
    const cx = left + width - 42, cy = 84, r = 28
    doc.circle(cx, cy, r).lineWidth(1.5).strokeColor(GOLD).stroke()
    for (const [k, colour] of [['c2', INK], ['c3', RED]] as const) {
      const v = s.contacts[k]?.vertexAngleDeg
      if (v === undefined) continue
      const a = (v * Math.PI) / 180
      const px = cx - r * Math.sin(a), py = cy - r * Math.cos(a)
      doc.circle(px, py, 4).fillColor(colour).fill()
      // Label inside the disc, next to its point.
      doc.font('ws-semi').fontSize(8).fillColor(colour).text(k.toUpperCase(), px + (px < cx ? 6 : -18), py + (py < cy ? 4 : -12))
    }
    doc.font('ws').fontSize(7).fillColor(MUTED).text(tr('doc.pdf.zenithUp'), cx - 16, cy - r - 12)
    doc.text(tr('doc.pdf.sunAsSeen'), cx - 20, cy + r + 4)

    // Terrain warnings
    y = tableBottom + 8
    for (const w of s.terrainWarnings) {
      doc.font('ws-bold').fontSize(9).fillColor(RED).text(plain(tr('doc.pdf.terrain', { warning: w })), left, y, { width })
      y = doc.y + 4
    }
    // Cues
    doc.font('ws-bold').fontSize(12).fillColor(INK).text(tr('doc.pdf.cues'), left, y + (s.terrainWarnings.length ? 4 : 0))
    y = doc.y + 4
    if (s.notice) {
      doc.font('ws-bold').fontSize(10).fillColor(RED).text(s.notice, left, y, { width })
      y = doc.y + 6
    } else if (s.filtersOffWindow) {
      doc.font('ws').fontSize(8).fillColor(MUTED).text(plain(tr('doc.pdf.filtersWindow', { start: s.filtersOffWindow.startUtc.slice(11, 21), end: s.filtersOffWindow.endUtc.slice(11, 21), sigmas: t.trip.margins.sigmas, endSec: t.trip.margins.endSec })), left, y, { width })
      y = doc.y + 6
    }
    for (const c of s.cues) {
      doc.font('ws-semi').fontSize(10).fillColor(c.filters === 'off' ? RED : INK).text(c.local.slice(11), left, y, { width: 60 })
      doc.font('ws').fontSize(8).fillColor(MUTED).text(`UTC ${utcClock(c.utc)}`, left, y + 12, { width: 60 })
      doc.font(c.filters === 'off' ? 'ws-bold' : 'ws').fontSize(10).fillColor(INK).text(plain(tr(c.filters === 'off' ? 'doc.pdf.tagOff' : 'doc.pdf.tagOn', { label: c.label })), left + 70, y, { width: width - 70 })
      y = Math.max(doc.y, y + 22) + 4
    }
    // Safety block
    y += 6
    const boxTop = y
    doc.font('ws-bold').fontSize(10).fillColor(RED).text(safetyTitle(locale), left + 10, y + 8)
    doc.font('ws').fontSize(9).fillColor(INK)
    for (const line of safetyLines(s.kind, locale)) doc.text(plain(`• ${line}`), left + 10, doc.y + 2, { width: width - 20 })
    doc.rect(left, boxTop, width, doc.y - boxTop + 8).lineWidth(1).strokeColor(RED).stroke()
    doc.font('ws').fontSize(7.5).fillColor(MUTED)
      .text(plain(tr('doc.pdf.footnote', { line: localAndUtcLine(s.time.line, s, locale), source: s.elementsSource, method: s.uncertaintyMethod, at: generatedAt(t.generatedAt, locale) })), left, doc.y + 14, { width })
    const b = briefings.find((x) => x.site.id === s.siteId)
    if (b) briefingPage(doc, b, locale)
  }
  if (rooming) roomingPage(doc, t.trip.title, rooming)
  doc.end()
  return done
}

/** The participants' briefing for one site: the sequence, where to look, the corona, the sky's history, what to bring, safety. */
function briefingPage(doc: PDFKit.PDFDocument, b: TripBriefing, locale?: string) {
  const tr = translator(locale)
  const words = phaseWords(b.kind, locale)
  const said = briefingWordsIn(b, locale)
  doc.addPage()
  const left = doc.page.margins.left
  const width = doc.page.width - left - doc.page.margins.right
  const bottom = doc.page.height - doc.page.margins.bottom
  const room = (h: number) => { if (doc.y + h > bottom) doc.addPage() }
  doc.font('ws-semi').fontSize(8).fillColor(MUTED).text(tr(b.site.role === 'primary' ? 'doc.pdf.kickerBriefingPrimary' : 'doc.pdf.kickerBriefingBackup'), left, 40)
  doc.font('ws-bold').fontSize(16).fillColor(INK).text(tr('doc.pdf.whatYouSee', { site: b.site.name }), left, 54, { width })
  doc.font('ws').fontSize(9.5).fillColor(INK).text(plain(words.central && b.durationSec
    ? tr('doc.pdf.briefingLineCentral', { trip: b.trip.title, eclipse: words.eclipseInline, central: words.central, duration: tr('doc.pdf.duration', { min: Math.floor(b.durationSec / 60), sec: Math.round(b.durationSec % 60) }), offset: b.site.utcOffset })
    : tr('doc.pdf.briefingLine', { trip: b.trip.title, eclipse: words.eclipseInline, offset: b.site.utcOffset })), { width })
  if (said.notice) doc.moveDown(0.3).font('ws-bold').fontSize(10).fillColor(RED).text(said.notice, { width })
  doc.moveDown(0.5)
  for (const [i, st] of b.steps.entries()) {
    room(34)
    const y = doc.y
    doc.font('ws-semi').fontSize(9.5).fillColor(st.filters === 'off' ? RED : INK).text(st.local.slice(11), left, y, { width: 56 })
    doc.font('ws').fontSize(7).fillColor(MUTED).text(`UTC ${utcClock(st.utc)}`, left, y + 11, { width: 56 })
    doc.font(st.filters === 'off' ? 'ws-bold' : 'ws-semi').fontSize(9.5).fillColor(INK).text(plain(tr(`doc.pdf.step${st.filters === 'off' ? 'Off' : 'On'}${st.commonPractice ? 'Practice' : ''}`, { title: said.steps[i]!.title })), left + 62, y, { width: width - 62 })
    doc.font('ws').fontSize(8.5).fillColor(INK).text(plain(said.steps[i]!.text), left + 62, doc.y + 1, { width: width - 62 })
    doc.y = Math.max(doc.y, y + 22) + 3
  }
  // Where to look: the same panorama as the web page, drawn with PDF primitives.
  const sun = b.sky.sun.filter((x) => x.contact !== 'c1' && x.contact !== 'c4').map((x) => ({ label: x.contact === 'max' ? tr('doc.pdf.maxShort') : x.contact.toUpperCase(), altitudeDeg: x.altitudeDeg, azimuthDeg: x.azimuthDeg }))
  const objs = (b.sky.darkSky ? b.sky.objects : []).map((o) => ({ label: skyNameIn(o.name, locale), altitudeDeg: o.altitudeDeg, azimuthDeg: o.azimuthDeg }))
  const d = skyDiagram(sun, objs, { width: 640, height: 220 })
  const k = width / d.width
  room(d.height * k + 40)
  doc.font('ws-bold').fontSize(11).fillColor(INK).text(tr('doc.pdf.whereToLook'), left, doc.y + 4)
  const top = doc.y + 4
  const X = (x: number) => left + x * k, Y = (y: number) => top + y * k
  doc.rect(X(0), Y(0), d.width * k, d.horizonY * k).fill('#1a1633')
  doc.rect(X(0), Y(d.horizonY), d.width * k, (d.height - d.horizonY) * k).fill('#3b3566')
  for (const a of d.altitudes) {
    doc.moveTo(X(0), Y(a.y)).lineTo(X(d.width), Y(a.y)).dash(2, { space: 3 }).lineWidth(0.4).strokeColor('#4a4380').stroke().undash()
    doc.font('ws').fontSize(6.5).fillColor('#a9a2d6').text(a.label, X(4), Y(a.y) - 8)
  }
  doc.moveTo(X(0), Y(d.horizonY)).lineTo(X(d.width), Y(d.horizonY)).lineWidth(1).strokeColor('#d8c7a0').stroke()
  for (const t of d.ticks) doc.font('ws').fontSize(7).fillColor('#f2ead6').text(t.label, X(t.x) - 10, Y(d.horizonY) + 5, { width: 20, align: 'center' })
  for (const s of d.sun) {
    doc.circle(X(s.x), Y(s.y), 5).fill('#f5c45e')
    doc.font('ws-semi').fontSize(7.5).fillColor('#fff4d6').text(s.label, X(s.x) + 7, Y(s.y) - 10)
  }
  for (const o of d.objects) {
    doc.circle(X(o.x), Y(o.y), 2).fill('#c9e3ff')
    doc.font('ws').fontSize(7).fillColor('#c9e3ff').text(o.label, X(o.labelX), Y(o.labelY) - 9, { lineBreak: false })
  }
  doc.y = Y(d.height) + 4
  const sunAt = b.sky.sun.map((x) => tr('doc.pdf.sunAt', { label: words.contact[x.contact], alt: numbers(locale)(x.altitudeDeg, 0), dir: locale && locale !== 'en' ? compassIn(x.azimuthDeg, locale, 'words') : x.direction })).join('; ')
  doc.font('ws').fontSize(8).fillColor(MUTED).text(plain(d.behind.length ? tr('doc.pdf.facingBehind', { list: sunAt, behind: d.behind.join(', ') }) : tr('doc.pdf.facing', { list: sunAt })), left, doc.y, { width })
  if (b.corona) { room(40); doc.moveDown(0.4).font('ws-bold').fontSize(11).fillColor(INK).text(tr('doc.pdf.corona'), left); doc.font('ws').fontSize(9).text(plain(said.corona ?? ''), { width }) }
  room(40)
  doc.moveDown(0.4).font('ws-bold').fontSize(11).fillColor(INK).text(tr('doc.pdf.history'), left)
  doc.font('ws').fontSize(9).text(plain(b.weather.source ? tr('doc.pdf.source', { words: said.weather, source: b.weather.source }) : said.weather), { width })
  room(20 + said.checklist.length * 12)
  doc.moveDown(0.4).font('ws-bold').fontSize(11).fillColor(INK).text(tr('doc.pdf.bring'), left)
  doc.font('ws').fontSize(9)
  for (const item of said.checklist) doc.text(plain(`•  ${item}`), left, doc.y + 1, { width })
  room(90)
  const boxTop = doc.y + 8
  doc.font('ws-bold').fontSize(10).fillColor(RED).text(safetyTitle(locale), left + 10, boxTop + 8)
  doc.font('ws').fontSize(8.5).fillColor(INK)
  for (const line of safetyLines(b.kind, locale)) doc.text(plain(`• ${line}`), left + 10, doc.y + 2, { width: width - 20 })
  doc.rect(left, boxTop, width, doc.y - boxTop + 8).lineWidth(1).strokeColor(RED).stroke()
}

/** One seat's room, for the organisers' rooming list (server/services/people/manifest.ts roomingList). */
export interface RoomingEntry { bookingId: number; seat: number; name: string; roomType: string | null; with: string | null }

/** The rooming list (organisers' pack only): who sleeps in which kind of room, and with whom, grouped by room type. */
function roomingPage(doc: PDFKit.PDFDocument, title: string, rooming: RoomingEntry[]) {
  doc.addPage()
  const left = doc.page.margins.left
  const width = doc.page.width - left - doc.page.margins.right
  const bottom = doc.page.height - doc.page.margins.bottom
  doc.font('ws-semi').fontSize(8).fillColor(MUTED).text('UMBRAFIELD · ROOMING LIST', left, 40)
  doc.font('ws-bold').fontSize(16).fillColor(INK).text(title, left, 54, { width })
  doc.font('ws').fontSize(9).fillColor(MUTED).text(`${rooming.length} travellers on confirmed bookings. Names as in the passports, where given.`, { width })
  doc.moveDown(0.6)
  const order = ['single', 'double', 'twin', 'shared', null]
  const sorted = [...rooming].sort((a, b) => order.indexOf(a.roomType) - order.indexOf(b.roomType) || a.bookingId - b.bookingId || a.seat - b.seat)
  let y = doc.y
  const cols = [0, 60, 260, 340]
  doc.font('ws-semi').fontSize(8).fillColor(MUTED)
  ;['BOOKING', 'NAME', 'ROOM', 'SHARING WITH'].forEach((h, i) => doc.text(h, left + cols[i]!, y))
  y += 13
  for (const r of sorted) {
    if (y + 16 > bottom) { doc.addPage(); y = doc.page.margins.top }
    doc.moveTo(left, y - 3).lineTo(left + width, y - 3).lineWidth(0.4).strokeColor('#d2cee8').stroke()
    doc.font('ws').fontSize(9.5).fillColor(INK)
    doc.text(`#${r.bookingId} · ${r.seat}`, left + cols[0]!, y, { width: cols[1]! - 4, lineBreak: false })
    doc.text(r.name, left + cols[1]!, y, { width: cols[2]! - cols[1]! - 6, lineBreak: false, ellipsis: true })
    doc.font(r.roomType ? 'ws' : 'ws-semi').fillColor(r.roomType ? INK : RED).text(r.roomType ?? 'not given', left + cols[2]!, y, { lineBreak: false })
    doc.font('ws').fillColor(INK).text(r.with ?? '', left + cols[3]!, y, { width: width - cols[3]!, lineBreak: false, ellipsis: true })
    y += 16
  }
}
