import { button, esc, frame, type Mail } from '../mailTemplates'

const para = (html: string) => `<p style="margin:0 0 12px">${html}</p>`

/**
 * An organiser's message to the group. The body is the organiser's plain text: every character is
 * escaped for HTML, paragraphs split on blank lines and single line breaks kept, so nothing typed
 * (a tag, an attribute, an entity) becomes markup in anyone's mail program.
 */
export function groupMessageMail(d: { tripTitle: string; subject: string; body: string; name: string; organiser: string; bookingUrl: string }): Mail {
  const paragraphs = d.body.split(/\r?\n\s*\r?\n/).map((block) => para(block.split(/\r?\n/).map(esc).join('<br>'))).join('')
  const html = para(`Hello ${esc(d.name)},`) + paragraphs + button(d.bookingUrl, 'Your booking')
  const text = `Hello ${d.name},\n\n${d.body}\n\n${d.bookingUrl}`
  const mail = frame(d.subject, html, text, `Sent by Umbrafield for ${d.organiser}, about ${d.tripTitle}.`)
  return { ...mail, subject: `${d.subject} — ${d.tripTitle}` }
}

export interface AlertLine { kind: string; summary: string; tripTitle: string; at: string }

const KIND_WORDS: Record<string, string> = { booking: 'New booking', payment: 'Payment', cancellation: 'Cancellation', waitlist: 'Waitlist' }
export const alertKindWord = (kind: string) => KIND_WORDS[kind] ?? kind

/** One alert, mailed when it happens (the organiser's "immediate" choice). */
export function alertMail(d: AlertLine & { url: string }): Mail {
  const title = `${alertKindWord(d.kind)}: ${d.tripTitle}`
  return frame(title,
    para(`${esc(d.summary)}.`) + para(`At ${esc(d.at.slice(0, 16).replace('T', ' '))} UTC.`) + button(d.url, 'Open the bookings'),
    `${d.summary}.\nAt ${d.at.slice(0, 16).replace('T', ' ')} UTC.\n${d.url}`,
    'Sent by Umbrafield to the trip\'s organisers. Choose immediate mail or a daily digest on the Alerts page.')
}

/** The day's digest: every alert that waited for it, grouped by trip. */
export function alertDigestMail(d: { date: string; lines: AlertLine[]; url: string }): Mail {
  const byTrip = new Map<string, AlertLine[]>()
  for (const l of d.lines) byTrip.set(l.tripTitle, [...(byTrip.get(l.tripTitle) ?? []), l])
  const title = `Your trips: ${d.lines.length} alert${d.lines.length === 1 ? '' : 's'} before ${d.date}`
  let html = ''
  let text = ''
  for (const [trip, lines] of byTrip) {
    html += `<h2 style="font-size:16px;margin:16px 0 6px">${esc(trip)}</h2><ul style="margin:0 0 12px 18px;padding:0">${lines.map((l) => `<li>${esc(l.at.slice(0, 16).replace('T', ' '))} UTC — ${esc(alertKindWord(l.kind))}: ${esc(l.summary)}</li>`).join('')}</ul>`
    text += `${trip.toUpperCase()}\n${lines.map((l) => `- ${l.at.slice(0, 16).replace('T', ' ')} UTC — ${alertKindWord(l.kind)}: ${l.summary}`).join('\n')}\n\n`
  }
  return frame(title, html + button(d.url, 'Open your alerts'), `${text}${d.url}`,
    'Sent by Umbrafield to the trip\'s organisers, once a business day. Choose immediate mail or this digest on the Alerts page.')
}
