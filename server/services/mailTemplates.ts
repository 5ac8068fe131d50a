import { formatMoney } from '../../shared/schemas/trips'
import { safetyLines, type LocalKind } from '../../shared/safety/text'
import { languageTag } from '../../shared/i18n/locales'
import { translator, type Params } from '../../shared/i18n/translate'

export interface Mail { subject: string; html: string; text: string }

export const esc = (s: string) => s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;')

/** Umbrafield's mail frame: indigo band, gold rule, paper body; plain text alongside. */
export function frame(title: string, bodyHtml: string, bodyText: string, footer = 'Sent by Umbrafield on behalf of your eclipse trip organiser.'): Mail {
  const html = `<!doctype html><html><body style="margin:0;background:#fbf9f4;font-family:'Work Sans',Arial,sans-serif;color:#1a1633">
<table role="presentation" width="100%" cellpadding="0" cellspacing="0"><tr><td align="center" style="padding:24px 12px">
<table role="presentation" width="600" cellpadding="0" cellspacing="0" style="max-width:600px;background:#ffffff;border:1px solid #e9e7f4;border-radius:10px">
<tr><td style="background:#1a1633;color:#fdefc9;padding:18px 24px;border-radius:10px 10px 0 0;font-size:18px;font-weight:700">Umbrafield<div style="height:3px;background:#eeae33;margin-top:10px;width:64px"></div></td></tr>
<tr><td style="padding:24px;font-size:15px;line-height:1.55"><h1 style="font-size:20px;margin:0 0 12px">${esc(title)}</h1>${bodyHtml}</td></tr>
<tr><td style="padding:14px 24px;color:#62579b;font-size:12px;border-top:1px solid #e9e7f4">${esc(footer)}</td></tr>
</table></td></tr></table></body></html>`
  return { subject: title, html, text: `${title}\n${'='.repeat(title.length)}\n\n${bodyText}\n\n--\n${footer}\n` }
}

const p = (s: string) => `<p style="margin:0 0 12px">${s}</p>`
export const button = (href: string, label: string) => `<p style="margin:16px 0"><a href="${esc(href)}" style="background:#eeae33;color:#1a1633;padding:10px 16px;border-radius:6px;font-weight:700;text-decoration:none">${esc(label)}</a></p>`
/** The one safety text (shared/safety/text.ts), for the kind of eclipse at the trip's site when known. */
const safetyHtml = (kind?: LocalKind, locale?: string) => `<div style="border-left:4px solid #c9453a;background:#fdf2f1;padding:10px 14px;margin:16px 0"><strong>${esc(translator(locale)('safety.title'))}</strong><ul style="margin:6px 0 0 18px;padding:0">${safetyLines(kind, locale).map((l) => `<li>${esc(l)}</li>`).join('')}</ul></div>`
const safetyText = (kind?: LocalKind, locale?: string) => `${translator(locale)('safety.heading')}\n${safetyLines(kind, locale).map((l) => `- ${l}`).join('\n')}`

/**
 * A translator for HTML bodies: every value is escaped unless passed in `markup` (already HTML).
 * The messages' own text is written by us and holds no markup.
 */
function htmlT(t: ReturnType<typeof translator>) {
  return (key: string, params: Params = {}, markup: Record<string, string> = {}, count?: number) =>
    t(key, { ...Object.fromEntries(Object.entries(params).map(([k, v]) => [k, esc(String(v))])), ...markup }, count)
}

/** Money, in the reader's language (minor units and an ISO 4217 code). */
export function money(minor: number, currency: string, locale?: string): string {
  return new Intl.NumberFormat(languageTag(locale), { style: 'currency', currency: currency.toUpperCase() }).format(minor / 100)
}

export interface BookingMailData {
  name: string; tripTitle: string; seats: number; currency: string; priceMinor: number; paidMinor: number; dueMinor: number; bookingUrl: string
  /** What is seen at the trip's site, for the safety text; omitted: the general wording. */
  eclipseKind?: LocalKind
}

export function bookingHeld(d: BookingMailData & { holdExpiresAt: string; depositMinor: number }): Mail {
  const until = `${d.holdExpiresAt.slice(11, 16)} UTC`
  return frame(`Seats held: ${d.tripTitle}`,
    p(`Hello ${esc(d.name)},`) + p(`We are holding <strong>${d.seats} seat${d.seats > 1 ? 's' : ''}</strong> for you until ${until}. Pay the deposit of <strong>${formatMoney(d.depositMinor, d.currency)}</strong> to confirm them.`) + button(d.bookingUrl, 'Pay the deposit') + p('If the hold lapses unpaid, the seats go back on sale.') + safetyHtml(d.eclipseKind),
    `Hello ${d.name},\n\nWe are holding ${d.seats} seat(s) for you until ${until}. Pay the deposit of ${formatMoney(d.depositMinor, d.currency)} to confirm them:\n${d.bookingUrl}\n\nIf the hold lapses unpaid, the seats go back on sale.\n\n${safetyText(d.eclipseKind)}`)
}

export function bookingConfirmed(d: BookingMailData & { balanceDueDate: string }): Mail {
  return frame(`Booking confirmed: ${d.tripTitle}`,
    p(`Hello ${esc(d.name)},`) + p(`Your ${d.seats} seat${d.seats > 1 ? 's are' : ' is'} confirmed. Paid so far: <strong>${formatMoney(d.paidMinor, d.currency)}</strong> of ${formatMoney(d.priceMinor, d.currency)}. The balance of ${formatMoney(d.dueMinor, d.currency)} is due by ${d.balanceDueDate}.`) + button(d.bookingUrl, 'See your booking') + safetyHtml(d.eclipseKind),
    `Hello ${d.name},\n\nYour ${d.seats} seat(s) are confirmed. Paid so far: ${formatMoney(d.paidMinor, d.currency)} of ${formatMoney(d.priceMinor, d.currency)}. The balance of ${formatMoney(d.dueMinor, d.currency)} is due by ${d.balanceDueDate}.\n${d.bookingUrl}\n\n${safetyText(d.eclipseKind)}`)
}

export function paymentReceipt(d: BookingMailData & { amountMinor: number; kind: string; reference: string | null; paidAt: string }): Mail {
  return frame(`Receipt: ${formatMoney(d.amountMinor, d.currency)} for ${d.tripTitle}`,
    p(`Hello ${esc(d.name)},`) + p(`We received <strong>${formatMoney(d.amountMinor, d.currency)}</strong> (${esc(d.kind)}) on ${d.paidAt.slice(0, 16).replace('T', ' ')} UTC. Reference: ${esc(d.reference ?? '—')}.`) + p(`Paid in total: ${formatMoney(d.paidMinor, d.currency)}; still owed: ${formatMoney(d.dueMinor, d.currency)}.`) + button(d.bookingUrl, 'Your booking'),
    `Hello ${d.name},\n\nWe received ${formatMoney(d.amountMinor, d.currency)} (${d.kind}) on ${d.paidAt.slice(0, 16).replace('T', ' ')} UTC. Reference: ${d.reference ?? '—'}.\nPaid in total: ${formatMoney(d.paidMinor, d.currency)}; still owed: ${formatMoney(d.dueMinor, d.currency)}.\n${d.bookingUrl}`)
}

export function balanceReminder(d: BookingMailData & { balanceDueDate: string; daysBefore: number }): Mail {
  return frame(`Balance due in ${d.daysBefore} days: ${d.tripTitle}`,
    p(`Hello ${esc(d.name)},`) + p(`A friendly reminder: the balance of <strong>${formatMoney(d.dueMinor, d.currency)}</strong> is due by ${d.balanceDueDate}.`) + button(d.bookingUrl, 'Pay the balance'),
    `Hello ${d.name},\n\nA friendly reminder: the balance of ${formatMoney(d.dueMinor, d.currency)} is due by ${d.balanceDueDate}.\n${d.bookingUrl}`)
}

export function refundIssued(d: BookingMailData & { amountMinor: number; reason: string }): Mail {
  return frame(`Refund issued: ${formatMoney(d.amountMinor, d.currency)}`,
    p(`Hello ${esc(d.name)},`) + p(`We have refunded <strong>${formatMoney(d.amountMinor, d.currency)}</strong> for ${esc(d.tripTitle)} (${esc(d.reason)}). Card refunds usually show within 5–10 working days.`) + button(d.bookingUrl, 'Your booking'),
    `Hello ${d.name},\n\nWe have refunded ${formatMoney(d.amountMinor, d.currency)} for ${d.tripTitle} (${d.reason}). Card refunds usually show within 5–10 working days.\n${d.bookingUrl}`)
}

export function waitlistOffer(d: { name: string; tripTitle: string; seats: number; offerExpiresAt: string; tripUrl: string }): Mail {
  return frame(`A seat has freed up: ${d.tripTitle}`,
    p(`Hello ${esc(d.name)},`) + p(`${d.seats} seat${d.seats > 1 ? 's are' : ' is'} now held for you until <strong>${d.offerExpiresAt.slice(0, 16).replace('T', ' ')} UTC</strong>. Book before then to take ${d.seats > 1 ? 'them' : 'it'}.`) + button(d.tripUrl, 'Book now'),
    `Hello ${d.name},\n\n${d.seats} seat(s) are now held for you until ${d.offerExpiresAt.slice(0, 16).replace('T', ' ')} UTC. Book before then:\n${d.tripUrl}`)
}

export interface ItineraryData extends BookingMailData {
  meeting: { name: string; local: string; utcOffset: string; zone: string }
  site: { name: string; lat: number; lon: number; mapUrl: string; zone: string }
  contacts: Array<{ label: string; local: string; utc: string }>
  /** What is seen at the site: it sets the phase words and the safety text. */
  eclipseKind: LocalKind
  /** "Totality", "Annularity", or null for a partial site. */
  centralName: string | null
  durationSec: number
  /** The time basis (TT − UTC, UT1 − UTC, ΔT) in one line. */
  timeLine: string
  bring: string[]
  /** The participants' briefing for the trip (what they will see at the site, and when). */
  briefingUrl: string
  organiser: { name: string; email: string }
  /** The recipient's language (users.locale); English when unset. */
  locale?: string
}

export function itinerary(d: ItineraryData): Mail {
  const t = translator(d.locale)
  const th = htmlT(t)
  const m = (minor: number) => money(minor, d.currency, d.locale)
  const coord = new Intl.NumberFormat(languageTag(d.locale), { minimumFractionDigits: 4, maximumFractionDigits: 4, useGrouping: false })
  const seconds = new Intl.NumberFormat(languageTag(d.locale), { maximumFractionDigits: 0 }).format(d.durationSec)
  const centralLine = d.centralName ? t('mail.itinerary.central', { phase: d.centralName, seconds }) : t('mail.itinerary.partialHere')
  const h2 = (s: string) => `<h2 style="font-size:16px;margin:16px 0 6px">${esc(s)}</h2>`
  const rows = d.contacts.map((c) => `<tr><td style="padding:4px 8px 4px 0">${esc(c.label)}</td><td style="padding:4px 8px;font-weight:700">${esc(c.local)}</td><td style="padding:4px 0;color:#62579b">${esc(c.utc)} UTC</td></tr>`).join('')
  const html = p(th('mail.hello', { name: d.name })) + p(th('mail.itinerary.intro', { paid: m(d.paidMinor), due: m(d.dueMinor) }, { trip: `<strong>${esc(d.tripTitle)}</strong>`, seats: t('mail.itinerary.seatsHtml', {}, d.seats) }))
    + h2(t('mail.itinerary.meetingHeading')) + p(`${th('mail.itinerary.meetingLine', { place: d.meeting.name, offset: d.meeting.utcOffset, zone: d.meeting.zone }, { time: `<strong>${esc(d.meeting.local)}</strong>` })}.`)
    + h2(t('mail.itinerary.siteHeading')) + p(`${esc(d.site.name)} (${coord.format(d.site.lat)}°, ${coord.format(d.site.lon)}°) — <a href="${esc(d.site.mapUrl)}">${esc(t('mail.itinerary.openInApp'))}</a>. ${esc(centralLine)}${d.centralName ? '.' : ''}`)
    + h2(t('mail.itinerary.contactsHeading', { zone: d.site.zone })) + `<table role="presentation" style="border-collapse:collapse;font-size:14px">${rows}</table>` + `<p style="margin:6px 0 12px;color:#62579b;font-size:12px">${esc(d.timeLine)}</p>`
    + h2(t('mail.itinerary.briefingHeading')) + p(esc(t('mail.itinerary.briefingLead'))) + button(d.briefingUrl, t('mail.itinerary.briefingButton'))
    + h2(t('mail.itinerary.bringHeading')) + `<ul style="margin:0 0 12px 18px;padding:0">${d.bring.map((b) => `<li>${esc(b)}</li>`).join('')}</ul>`
    + safetyHtml(d.eclipseKind, d.locale) + p(th('mail.itinerary.questionsHtml', { organiser: d.organiser.name }, { email: `<a href="mailto:${esc(d.organiser.email)}">${esc(d.organiser.email)}</a>` }))
  const text = `${t('mail.hello', { name: d.name })}\n\n${t('mail.itinerary.intro', { trip: d.tripTitle, seats: t('mail.itinerary.seatsText', { n: d.seats }), paid: m(d.paidMinor), due: m(d.dueMinor) })}\n\n`
    + `${t('mail.itinerary.meetingHeadingText')}\n${t('mail.itinerary.meetingLine', { place: d.meeting.name, time: d.meeting.local, offset: d.meeting.utcOffset, zone: d.meeting.zone })}\n\n`
    + `${t('mail.itinerary.siteHeadingText')}\n${d.site.name} (${coord.format(d.site.lat)}, ${coord.format(d.site.lon)}) — ${d.site.mapUrl}\n${centralLine}\n\n`
    + `${t('mail.itinerary.contactsHeadingText', { zone: d.site.zone })}\n${d.contacts.map((c) => `${c.label.padEnd(28)} ${c.local}   (${c.utc} UTC)`).join('\n')}\n${d.timeLine}\n\n`
    + `${t('mail.itinerary.briefingHeadingText')}\n${t('mail.itinerary.briefingLead')}\n${d.briefingUrl}\n\n`
    + `${t('mail.itinerary.bringHeadingText')}\n${d.bring.map((b) => `- ${b}`).join('\n')}\n\n${safetyText(d.eclipseKind, d.locale)}\n\n`
    + t('mail.itinerary.questionsText', { organiser: d.organiser.name, email: d.organiser.email })
  return frame(t('mail.itinerary.subject', { trip: d.tripTitle }), html, text, t('mail.footer'))
}

export function confirmEmailMail(d: { name: string; url: string; hours: number }): Mail {
  return frame('Confirm your e-mail address',
    p(`Hello ${esc(d.name)},`) + p('Confirm that this address is yours, so that you can hold seats on eclipse trips:') + button(d.url, 'Confirm my address')
      + p(`The link works once, for ${d.hours} hours. If you did not sign up for Umbrafield, ignore this message.`),
    `Hello ${d.name},\n\nConfirm that this address is yours, so that you can hold seats on eclipse trips:\n${d.url}\n\nThe link works once, for ${d.hours} hours. If you did not sign up for Umbrafield, ignore this message.`)
}

export function refundStuckMail(d: { tripTitle: string; bookingId: number; amountMinor: number; currency: string; attempts: number; error: string; url: string }): Mail {
  const what = `A refund of ${formatMoney(d.amountMinor, d.currency)} on booking #${d.bookingId} (${d.tripTitle}) has failed ${d.attempts} times`
  return frame(`Refund keeps failing: booking #${d.bookingId}`,
    p(`${esc(what)}. Stripe said: <em>${esc(d.error)}</em>.`) + p('Umbrafield keeps retrying with growing pauses; the traveller has not been told it is done. Check the card and the payment in Stripe, or contact the traveller.') + button(d.url, 'Open the bookings'),
    `${what}. Stripe said: ${d.error}.\n\nUmbrafield keeps retrying with growing pauses; the traveller has not been told it is done. Check the card and the payment in Stripe, or contact the traveller.\n${d.url}`,
    'Sent by Umbrafield to the trip\'s organiser.')
}

export function accountExistsMail(d: { name: string; signInUrl: string }): Mail {
  return frame('Someone tried to sign up with your address',
    p(`Hello ${esc(d.name)},`) + p('Someone just tried to create an Umbrafield account with this e-mail address, which already has one. If it was you, sign in instead:') + button(d.signInUrl, 'Sign in')
      + p('If it was not you, nothing has changed and you need do nothing.'),
    `Hello ${d.name},\n\nSomeone just tried to create an Umbrafield account with this e-mail address, which already has one. If it was you, sign in instead:\n${d.signInUrl}\n\nIf it was not you, nothing has changed and you need do nothing.`)
}

export function passwordResetMail(d: { name: string; url: string; minutes: number }): Mail {
  return frame('Choose a new password',
    p(`Hello ${esc(d.name)},`) + p('Someone, hopefully you, asked to set a new password for your Umbrafield account. Follow this link to choose one:') + button(d.url, 'Choose a new password')
      + p(`The link works once, for ${d.minutes} minutes; a newer request replaces it. Choosing a new password signs you out on every device. If you did not ask, ignore this message: your password stays as it is.`),
    `Hello ${d.name},\n\nSomeone, hopefully you, asked to set a new password for your Umbrafield account. Follow this link to choose one:\n${d.url}\n\nThe link works once, for ${d.minutes} minutes; a newer request replaces it. Choosing a new password signs you out on every device. If you did not ask, ignore this message: your password stays as it is.`)
}

export function passwordResetNoAccountMail(d: { signUpUrl: string }): Mail {
  return frame('No Umbrafield account uses this address',
    p('Someone asked to set a new Umbrafield password for this e-mail address, but no account uses it. If it was you, you may have signed up with another address, or you can create an account:') + button(d.signUpUrl, 'Create an account')
      + p('If it was not you, ignore this message: nothing has changed.'),
    `Someone asked to set a new Umbrafield password for this e-mail address, but no account uses it. If it was you, you may have signed up with another address, or you can create an account:\n${d.signUpUrl}\n\nIf it was not you, ignore this message: nothing has changed.`)
}

export function invitationMail(d: { name: string; inviter: string; role: string; url: string; days: number }): Mail {
  return frame('You are invited to Umbrafield',
    p(`Hello ${esc(d.name)},`) + p(`${esc(d.inviter)} has made you an Umbrafield account as ${d.role === 'organiser' ? 'an organiser' : 'a guide'}. Choose your password to start:`) + button(d.url, 'Choose your password')
      + p(`The link works once, for ${d.days} days. If you were not expecting this, ignore this message.`),
    `Hello ${d.name},\n\n${d.inviter} has made you an Umbrafield account as ${d.role === 'organiser' ? 'an organiser' : 'a guide'}. Choose your password to start:\n${d.url}\n\nThe link works once, for ${d.days} days. If you were not expecting this, ignore this message.`)
}

/** A trip's dates, meeting point or sites changed: each change with its old and new value. */
export function tripChanged(d: { name: string; tripTitle: string; changes: Array<{ label: string; from: string; to: string }>; tripUrl: string }): Mail {
  const rows = d.changes.map((c) => `<tr><td style="padding:4px 8px 4px 0;font-weight:700">${esc(c.label)}</td><td style="padding:4px 8px;color:#62579b"><s>${esc(c.from)}</s></td><td style="padding:4px 0">${esc(c.to)}</td></tr>`).join('')
  return frame(`Your trip has changed: ${d.tripTitle}`,
    p(`Hello ${esc(d.name)},`) + p(`The organiser has changed <strong>${esc(d.tripTitle)}</strong>:`)
      + `<table role="presentation" style="border-collapse:collapse;font-size:14px"><tr><th align="left">What</th><th align="left">Was</th><th align="left">Now</th></tr>${rows}</table>`
      + p('Your booking, its price and its terms stay as agreed.') + button(d.tripUrl, 'See the trip'),
    `Hello ${d.name},\n\nThe organiser has changed ${d.tripTitle}:\n\n${d.changes.map((c) => `${c.label}\n  was: ${c.from}\n  now: ${c.to}`).join('\n\n')}\n\nYour booking, its price and its terms stay as agreed.\n${d.tripUrl}`)
}

/** The day's decision: where the group goes, when it leaves, where it meets; one button acknowledges. */
export function decisionMail(d: { name: string; tripTitle: string; siteName: string; departLocal: string; departUtc: string; meetingPoint: string; message: string | null; ackUrl: string; forName?: string; eclipseKind?: LocalKind }): Mail {
  const forLine = d.forName ? ` (for ${d.forName})` : ''
  return frame(`Eclipse day: we go to ${d.siteName}`,
    p(`Hello ${esc(d.name)}${esc(forLine)},`) + p(`For <strong>${esc(d.tripTitle)}</strong> we observe from <strong>${esc(d.siteName)}</strong>.`)
      + p(`Meet at <strong>${esc(d.meetingPoint)}</strong>; we leave at <strong>${esc(d.departLocal)}</strong> local time (${esc(d.departUtc)} UTC).`)
      + (d.message ? p(esc(d.message)) : '') + button(d.ackUrl, 'I have seen this') + p('Please press the button on that page so your guide knows you have it.') + safetyHtml(d.eclipseKind),
    `Hello ${d.name}${forLine},\n\nFor ${d.tripTitle} we observe from ${d.siteName}.\nMeet at ${d.meetingPoint}; we leave at ${d.departLocal} local time (${d.departUtc} UTC).\n${d.message ? `\n${d.message}\n` : ''}\nPlease confirm you have seen this (open the link and press the button):\n${d.ackUrl}\n\n${safetyText(d.eclipseKind)}`)
}

/** Travellers whose participant details are incomplete (45 and 14 days before the trip, or an organiser's nudge). */
export function participantsReminderMail(d: { name: string; tripTitle: string; startDate: string; daysBefore: number | null; missing: Array<{ seat: number; fields: string[] }>; bookingUrl: string }): Mail {
  const when = d.daysBefore === null ? `before the trip starts on ${d.startDate}` : `— the trip starts in ${d.daysBefore} days, on ${d.startDate}`
  const lines = d.missing.map((m) => `Seat ${m.seat}: ${m.fields.join(', ')}`)
  return frame(`Traveller details needed: ${d.tripTitle}`,
    p(`Hello ${esc(d.name)},`) + p(`Hotels, border officials, airlines and insurers need each traveller's details ${esc(when)}. Still missing:`)
    + `<ul style="margin:0 0 12px 18px;padding:0">${lines.map((l) => `<li>${esc(l)}</li>`).join('')}</ul>` + button(d.bookingUrl, 'Complete the details'),
    `Hello ${d.name},\n\nHotels, border officials, airlines and insurers need each traveller's details ${when}. Still missing:\n${lines.map((l) => `- ${l}`).join('\n')}\n\n${d.bookingUrl}`)
}
