import { createRequire } from 'node:module'
import PDFDocument from 'pdfkit'
import type { timetable } from './timetable'

type Timetable = Awaited<ReturnType<typeof timetable>>

const fontPath = (weight: 400 | 600 | 700) => createRequire(import.meta.url).resolve(`@fontsource/work-sans/files/work-sans-latin-${weight}-normal.woff`)

/** The embedded latin subset of Work Sans has no Greek or astronomical symbols: spell them out. */
const plain = (t: string) => t.replace(/σ/g, 'sigma').replace(/ΔT/g, 'delta-T').replace(/Δ/g, 'delta ').replace(/☉/g, 'Sun').replace(/″/g, '"').replace(/′/g, "'").replace(/−/g, '-')

const INK = '#1a1633', MUTED = '#62579b', GOLD = '#d8901b', RED = '#a8362d'

/** The contact timetable as a PDF: one page per site, A4 or US Letter, Work Sans embedded. */
export function timetablePdf(t: Timetable, paper: 'a4' | 'letter'): Promise<Buffer> {
  const doc = new PDFDocument({ size: paper === 'letter' ? 'LETTER' : 'A4', margin: 42, autoFirstPage: false, info: { Title: `${t.trip.title} — contact timetable`, Author: 'Umbrafield' } })
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
    doc.font('ws-semi').fontSize(8).fillColor(MUTED).text(`UMBRAFIELD · CONTACT TIMETABLE · ${s.role.toUpperCase()} SITE`, left, 40)
    const headW = width - 110
    doc.font('ws-bold').fontSize(18).fillColor(INK).text(s.name, left, 54, { width: headW })
    doc.font('ws').fontSize(10).fillColor(INK).text(`${t.trip.title} · eclipse of ${t.trip.eclipseId}`, { width: headW })
    doc.fillColor(MUTED).text(`${s.lat.toFixed(4)}°, ${s.lon.toFixed(4)}°, ${s.elevationM} m · time zone ${s.zone} (UTC${s.utcOffset} on the day)`, { width: headW })
    doc.moveDown(0.4)
    doc.font('ws-semi').fontSize(11).fillColor(INK)
      .text(`${s.words.eclipseName}${s.words.central ? ` — ${s.words.central}: ${s.durationSec ? `${Math.floor(s.durationSec / 60)} min ${(s.durationSec % 60).toFixed(1)} s` : '—'}` : ''} · magnitude ${s.magnitude.toFixed(4)} · obscuration ${(s.obscuration * 100).toFixed(1)} %`, { width: headW })

    // Contacts table
    let y = doc.y + 8
    const cols = [0, 150, 250, 345, 405, 455]
    doc.font('ws-semi').fontSize(8).fillColor(MUTED)
    ;['CONTACT', 'LOCAL TIME', 'UTC', '±', 'SUN ALT', 'SUN AZ'].forEach((h, i) => doc.text(h, left + cols[i]!, y))
    y += 13
    for (const k of ['c1', 'c2', 'max', 'c3', 'c4'] as const) {
      const c = s.contacts[k]
      if (!c) continue
      doc.moveTo(left, y - 3).lineTo(left + width, y - 3).lineWidth(0.4).strokeColor('#d2cee8').stroke()
      doc.font(k === 'c2' || k === 'c3' ? 'ws-bold' : 'ws').fontSize(10).fillColor(INK)
      doc.text(plain(s.words.contact[k]), left + cols[0]!, y)
      doc.text(c.local.slice(11), left + cols[1]!, y)
      doc.font('ws').text(c.utc.slice(11, 21), left + cols[2]!, y)
      doc.text(`${c.uncertaintySec.toFixed(1)} s`, left + cols[3]!, y)
      doc.text(`${c.altitudeDeg.toFixed(1)}°`, left + cols[4]!, y)
      doc.text(`${c.azimuthDeg.toFixed(0)}°`, left + cols[5]!, y)
      y += 16
      if (c.direction) { doc.fontSize(8).fillColor(MUTED).text(`contact point ${c.direction} (P ${c.positionAngleDeg?.toFixed(0)}°, V ${c.vertexAngleDeg?.toFixed(0)}°)`, left + cols[1]!, y - 3); y += 10 }
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
    doc.font('ws').fontSize(7).fillColor(MUTED).text('zenith up', cx - 16, cy - r - 12)
    doc.text('Sun, as seen', cx - 20, cy + r + 4)

    // Cues
    y = tableBottom + 8
    doc.font('ws-bold').fontSize(12).fillColor(INK).text('Cues', left, y)
    y = doc.y + 4
    if (s.notice) {
      doc.font('ws-bold').fontSize(10).fillColor(RED).text(s.notice, left, y, { width })
      y = doc.y + 6
    } else if (s.filtersOffWindow) {
      doc.font('ws').fontSize(8).fillColor(MUTED).text(plain(`Filters may be off only from ${s.filtersOffWindow.startUtc.slice(11, 21)} to ${s.filtersOffWindow.endUtc.slice(11, 21)} UTC (C2 + ${t.trip.margins.sigmas} σ to C3 − ${t.trip.margins.sigmas} σ − ${t.trip.margins.endSec} s).`), left, y, { width })
      y = doc.y + 6
    }
    for (const c of s.cues) {
      doc.font('ws-semi').fontSize(10).fillColor(c.filters === 'off' ? RED : INK).text(c.local.slice(11), left, y, { width: 60 })
      doc.font('ws').fontSize(8).fillColor(MUTED).text(`UTC ${new Date(Math.round(Date.parse(c.utc) / 1000) * 1000).toISOString().slice(11, 19)}`, left, y + 12, { width: 60 })
      doc.font(c.filters === 'off' ? 'ws-bold' : 'ws').fontSize(10).fillColor(INK).text(plain(`${c.label}  [filters ${c.filters}]`), left + 70, y, { width: width - 70 })
      y = Math.max(doc.y, y + 22) + 4
    }
    // Safety block
    y += 6
    const boxTop = y
    doc.font('ws-bold').fontSize(10).fillColor(RED).text('Eye safety', left + 10, y + 8)
    doc.font('ws').fontSize(9).fillColor(INK)
    for (const line of s.safety) doc.text(plain(`• ${line}`), left + 10, doc.y + 2, { width: width - 20 })
    doc.rect(left, boxTop, width, doc.y - boxTop + 8).lineWidth(1).strokeColor(RED).stroke()
    doc.font('ws').fontSize(7.5).fillColor(MUTED)
      .text(plain(`${s.time.line} Elements: ${s.elementsSource}. ± ${s.uncertaintyMethod}.`) + ` Generated ${t.generatedAt.slice(0, 16).replace('T', ' ')} UTC.`, left, doc.y + 14, { width })
  }
  doc.end()
  return done
}
