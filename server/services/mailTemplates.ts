import { formatMoney } from '../../shared/schemas/trips'
import { formatMinor } from '../../shared/money/minorUnits'
import { safetyLines, type LocalKind } from '../../shared/safety/text'
import { languageTag } from '../../shared/i18n/locales'
import { translator, type Params, type Translator } from '../../shared/i18n/translate'
import type { RequiredField } from '../../shared/schemas/participants'

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
/** An amount in minor units with the currency's own decimals (EUR 2, JPY 0), in the reader's language. */
export function money(minor: number, currency: string, locale?: string): string {
  return formatMinor(minor, currency, languageTag(locale))
}

export interface BookingMailData {
  name: string; tripTitle: string; seats: number; currency: string; priceMinor: number; paidMinor: number; dueMinor: number; bookingUrl: string
  /** What is seen at the trip's site, for the safety text; omitted: the general wording. */
  eclipseKind?: LocalKind
  /** The recipient's language (users.locale); English when unset. */
  locale?: string
}

/** A calendar date (YYYY-MM-DD) for the reader: English keeps the ISO form; other languages read it in their own format. */
export function dateIn(isoDate: string, locale?: string): string {
  if (!locale || locale === 'en' || !/^\d{4}-\d{2}-\d{2}$/.test(isoDate)) return isoDate
  return new Intl.DateTimeFormat(languageTag(locale), { dateStyle: 'long', timeZone: 'UTC' }).format(new Date(`${isoDate}T00:00:00Z`))
}

/** A UTC instant as "YYYY-MM-DD HH:MM" (followed by "UTC" in the message); other languages read the date in their own format. */
function utcMinuteIn(iso: string, locale?: string): string {
  if (!locale || locale === 'en') return iso.slice(0, 16).replace('T', ' ')
  return `${dateIn(iso.slice(0, 10), locale)} ${iso.slice(11, 16)}`
}

export function bookingHeld(d: BookingMailData & { holdExpiresAt: string; depositMinor: number }): Mail {
  const t = translator(d.locale)
  const th = htmlT(t)
  const until = `${d.holdExpiresAt.slice(11, 16)} UTC`
  const deposit = money(d.depositMinor, d.currency, d.locale)
  return frame(t('mail.held.subject', { trip: d.tripTitle }),
    p(th('mail.hello', { name: d.name })) + p(th('mail.held.html', { until }, { seats: `<strong>${esc(t('mail.seatsHtml', {}, d.seats))}</strong>`, deposit: `<strong>${esc(deposit)}</strong>` })) + button(d.bookingUrl, t('mail.held.button')) + p(esc(t('mail.held.lapse'))) + safetyHtml(d.eclipseKind, d.locale),
    `${t('mail.hello', { name: d.name })}\n\n${t('mail.held.text', { seats: t('mail.seatsText', { n: d.seats }), until, deposit })}\n${d.bookingUrl}\n\n${t('mail.held.lapse')}\n\n${safetyText(d.eclipseKind, d.locale)}`, t('mail.footer'))
}

export function bookingConfirmed(d: BookingMailData & { balanceDueDate: string }): Mail {
  const t = translator(d.locale)
  const th = htmlT(t)
  const m = (minor: number) => money(minor, d.currency, d.locale)
  const figures = { price: m(d.priceMinor), due: m(d.dueMinor), date: dateIn(d.balanceDueDate, d.locale) }
  return frame(t('mail.confirmed.subject', { trip: d.tripTitle }),
    p(th('mail.hello', { name: d.name })) + p(th('mail.confirmed.html', figures, { paid: `<strong>${esc(m(d.paidMinor))}</strong>` }, d.seats)) + button(d.bookingUrl, t('mail.confirmed.button')) + safetyHtml(d.eclipseKind, d.locale),
    `${t('mail.hello', { name: d.name })}\n\n${t('mail.confirmed.text', { ...figures, paid: m(d.paidMinor), n: d.seats })}\n${d.bookingUrl}\n\n${safetyText(d.eclipseKind, d.locale)}`, t('mail.footer'))
}

export function paymentReceipt(d: BookingMailData & { amountMinor: number; kind: string; reference: string | null; paidAt: string }): Mail {
  const t = translator(d.locale)
  const th = htmlT(t)
  const m = (minor: number) => money(minor, d.currency, d.locale)
  const amount = m(d.amountMinor)
  const kindKey = `mail.paymentKind.${d.kind}`
  const kind = t(kindKey) === kindKey ? d.kind : t(kindKey)
  const received = { kind, when: utcMinuteIn(d.paidAt, d.locale), ref: d.reference ?? '—' }
  const totals = { paid: m(d.paidMinor), due: m(d.dueMinor) }
  return frame(t('mail.receipt.subject', { amount, trip: d.tripTitle }),
    p(th('mail.hello', { name: d.name })) + p(th('mail.receipt.received', received, { amount: `<strong>${esc(amount)}</strong>` })) + p(th('mail.receipt.totals', totals)) + button(d.bookingUrl, t('mail.receipt.button')),
    `${t('mail.hello', { name: d.name })}\n\n${t('mail.receipt.received', { ...received, amount })}\n${t('mail.receipt.totals', totals)}\n${d.bookingUrl}`, t('mail.footer'))
}

export function balanceReminder(d: BookingMailData & { balanceDueDate: string; daysBefore: number }): Mail {
  const t = translator(d.locale)
  const th = htmlT(t)
  const due = money(d.dueMinor, d.currency, d.locale)
  const date = dateIn(d.balanceDueDate, d.locale)
  return frame(t('mail.balance.subject', { days: d.daysBefore, trip: d.tripTitle }),
    p(th('mail.hello', { name: d.name })) + p(th('mail.balance.body', { date }, { due: `<strong>${esc(due)}</strong>` })) + button(d.bookingUrl, t('mail.balance.button')),
    `${t('mail.hello', { name: d.name })}\n\n${t('mail.balance.body', { due, date })}\n${d.bookingUrl}`, t('mail.footer'))
}

export function refundIssued(d: BookingMailData & { amountMinor: number; reason: string }): Mail {
  const t = translator(d.locale)
  const th = htmlT(t)
  const amount = money(d.amountMinor, d.currency, d.locale)
  return frame(t('mail.refund.subject', { amount }),
    p(th('mail.hello', { name: d.name })) + p(th('mail.refund.body', { trip: d.tripTitle, reason: d.reason }, { amount: `<strong>${esc(amount)}</strong>` })) + button(d.bookingUrl, t('mail.refund.button')),
    `${t('mail.hello', { name: d.name })}\n\n${t('mail.refund.body', { amount, trip: d.tripTitle, reason: d.reason })}\n${d.bookingUrl}`, t('mail.footer'))
}

export function waitlistOffer(d: { name: string; tripTitle: string; seats: number; offerExpiresAt: string; tripUrl: string; locale?: string }): Mail {
  const t = translator(d.locale)
  const th = htmlT(t)
  const until = `${utcMinuteIn(d.offerExpiresAt, d.locale)} UTC`
  return frame(t('mail.offer.subject', { trip: d.tripTitle }),
    p(th('mail.hello', { name: d.name })) + p(th('mail.offer.html', {}, { until: `<strong>${esc(until)}</strong>` }, d.seats)) + button(d.tripUrl, t('mail.offer.button')),
    `${t('mail.hello', { name: d.name })}\n\n${t('mail.offer.text', { n: d.seats, until })}\n${d.tripUrl}`, t('mail.footer'))
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

export function confirmEmailMail(d: { name: string; url: string; hours: number; locale?: string }): Mail {
  const t = translator(d.locale)
  const th = htmlT(t)
  return frame(t('mail.account.confirm.subject'),
    p(th('mail.hello', { name: d.name })) + p(esc(t('mail.account.confirm.lead'))) + button(d.url, t('mail.account.confirm.button'))
      + p(th('mail.account.confirm.note', { hours: d.hours })),
    `${t('mail.hello', { name: d.name })}\n\n${t('mail.account.confirm.lead')}\n${d.url}\n\n${t('mail.account.confirm.note', { hours: d.hours })}`, t('mail.footer'))
}

export function refundStuckMail(d: { tripTitle: string; bookingId: number; amountMinor: number; currency: string; attempts: number; error: string; url: string }): Mail {
  const what = `A refund of ${formatMoney(d.amountMinor, d.currency)} on booking #${d.bookingId} (${d.tripTitle}) has failed ${d.attempts} times`
  return frame(`Refund keeps failing: booking #${d.bookingId}`,
    p(`${esc(what)}. Stripe said: <em>${esc(d.error)}</em>.`) + p('Umbrafield keeps retrying with growing pauses; the traveller has not been told it is done. Check the card and the payment in Stripe, or contact the traveller.') + button(d.url, 'Open the bookings'),
    `${what}. Stripe said: ${d.error}.\n\nUmbrafield keeps retrying with growing pauses; the traveller has not been told it is done. Check the card and the payment in Stripe, or contact the traveller.\n${d.url}`,
    'Sent by Umbrafield to the trip\'s organiser.')
}

export function accountExistsMail(d: { name: string; signInUrl: string; locale?: string }): Mail {
  const t = translator(d.locale)
  const th = htmlT(t)
  return frame(t('mail.account.exists.subject'),
    p(th('mail.hello', { name: d.name })) + p(esc(t('mail.account.exists.lead'))) + button(d.signInUrl, t('mail.account.exists.button'))
      + p(esc(t('mail.account.exists.note'))),
    `${t('mail.hello', { name: d.name })}\n\n${t('mail.account.exists.lead')}\n${d.signInUrl}\n\n${t('mail.account.exists.note')}`, t('mail.footer'))
}

export function passwordResetMail(d: { name: string; url: string; minutes: number; locale?: string }): Mail {
  const t = translator(d.locale)
  const th = htmlT(t)
  return frame(t('mail.account.reset.subject'),
    p(th('mail.hello', { name: d.name })) + p(esc(t('mail.account.reset.lead'))) + button(d.url, t('mail.account.reset.button'))
      + p(th('mail.account.reset.note', { minutes: d.minutes })),
    `${t('mail.hello', { name: d.name })}\n\n${t('mail.account.reset.lead')}\n${d.url}\n\n${t('mail.account.reset.note', { minutes: d.minutes })}`, t('mail.footer'))
}

export function passwordResetNoAccountMail(d: { signUpUrl: string }): Mail {
  return frame('No Umbrafield account uses this address',
    p('Someone asked to set a new Umbrafield password for this e-mail address, but no account uses it. If it was you, you may have signed up with another address, or you can create an account:') + button(d.signUpUrl, 'Create an account')
      + p('If it was not you, ignore this message: nothing has changed.'),
    `Someone asked to set a new Umbrafield password for this e-mail address, but no account uses it. If it was you, you may have signed up with another address, or you can create an account:\n${d.signUpUrl}\n\nIf it was not you, ignore this message: nothing has changed.`)
}

export function invitationMail(d: { name: string; inviter: string; role: string; url: string; days: number; locale?: string }): Mail {
  const t = translator(d.locale)
  const th = htmlT(t)
  const lead = { inviter: d.inviter, role: t(d.role === 'organiser' ? 'mail.account.invite.roleOrganiser' : 'mail.account.invite.roleGuide') }
  return frame(t('mail.account.invite.subject'),
    p(th('mail.hello', { name: d.name })) + p(th('mail.account.invite.lead', lead)) + button(d.url, t('mail.account.invite.button'))
      + p(th('mail.account.invite.note', { days: d.days })),
    `${t('mail.hello', { name: d.name })}\n\n${t('mail.account.invite.lead', lead)}\n${d.url}\n\n${t('mail.account.invite.note', { days: d.days })}`, t('mail.footer'))
}

/**
 * One change's label and values in the reader's language. The five changes travellers are told of
 * carry their field `key`; dates are ISO days, a meeting point is `meetingText`'s line in tripOps.ts
 * ("<place>, YYYY-MM-DD HH:MM local time (UTC<offset>, <zone>)"), a dropped fallback site names its
 * `site`. Anything else, and every value in English, stays as written.
 */
function changeIn(c: TripChange, t: Translator): TripChange {
  if (t.locale === 'en' || !c.key) return c
  const label = t(`mail.changed.label.${c.key}`)
  const value = (v: string): string => {
    if (c.key === 'startDate' || c.key === 'endDate') return dateIn(v, t.locale)
    if (c.key === 'meetingPoint') {
      const m = /^(.*), (\d{4}-\d{2}-\d{2})[ T](\d{2}:\d{2}) local time \(UTC([^,]*), ([^)]*)\)$/.exec(v)
      return m ? t('mail.changed.meeting', { place: m[1]!, time: `${dateIn(m[2]!, t.locale)} ${m[3]}`, offset: m[4]!, zone: m[5]! }) : v
    }
    return v === 'none' ? t('mail.changed.none') : v
  }
  if (c.key === 'backupSiteIds' && c.site) return { ...c, label, from: t('mail.changed.fallbackWas', { site: c.site }), to: t('mail.changed.fallbackNoMore', { site: c.site }) }
  return { ...c, label, from: value(c.from), to: value(c.to) }
}

export interface TripChange { label: string; from: string; to: string; key?: string; site?: string }

/** A trip's dates, meeting point or sites changed: each change with its old and new value. */
export function tripChanged(d: { name: string; tripTitle: string; changes: TripChange[]; tripUrl: string; locale?: string }): Mail {
  const t = translator(d.locale)
  const th = htmlT(t)
  const changes = d.changes.map((c) => changeIn(c, t))
  const rows = changes.map((c) => `<tr><td style="padding:4px 8px 4px 0;font-weight:700">${esc(c.label)}</td><td style="padding:4px 8px;color:#62579b"><s>${esc(c.from)}</s></td><td style="padding:4px 0">${esc(c.to)}</td></tr>`).join('')
  return frame(t('mail.changed.subject', { trip: d.tripTitle }),
    p(th('mail.hello', { name: d.name })) + p(th('mail.changed.lead', {}, { trip: `<strong>${esc(d.tripTitle)}</strong>` }))
      + `<table role="presentation" style="border-collapse:collapse;font-size:14px"><tr><th align="left">${esc(t('mail.changed.what'))}</th><th align="left">${esc(t('mail.changed.was'))}</th><th align="left">${esc(t('mail.changed.now'))}</th></tr>${rows}</table>`
      + p(esc(t('mail.changed.keep'))) + button(d.tripUrl, t('mail.changed.button')),
    `${t('mail.hello', { name: d.name })}\n\n${t('mail.changed.lead', { trip: d.tripTitle })}\n\n${changes.map((c) => `${c.label}\n  ${t('mail.changed.wasText', { value: c.from })}\n  ${t('mail.changed.nowText', { value: c.to })}`).join('\n\n')}\n\n${t('mail.changed.keep')}\n${d.tripUrl}`, t('mail.footer'))
}

/** The day's decision: where the group goes, when it leaves, where it meets; one button acknowledges. */
export function decisionMail(d: { name: string; tripTitle: string; siteName: string; departLocal: string; departUtc: string; meetingPoint: string; message: string | null; ackUrl: string; forName?: string; eclipseKind?: LocalKind; locale?: string }): Mail {
  const t = translator(d.locale)
  const th = htmlT(t)
  const hello = (f: (key: string, params: Params) => string) => d.forName ? f('mail.decision.helloFor', { name: d.name, for: d.forName }) : f('mail.hello', { name: d.name })
  const meet = { place: d.meetingPoint, time: d.departLocal, utc: d.departUtc }
  return frame(t('mail.decision.subject', { site: d.siteName }),
    p(hello((k, v) => th(k, v))) + p(th('mail.decision.observe', {}, { trip: `<strong>${esc(d.tripTitle)}</strong>`, site: `<strong>${esc(d.siteName)}</strong>` }))
      + p(th('mail.decision.meet', { utc: d.departUtc }, { place: `<strong>${esc(d.meetingPoint)}</strong>`, time: `<strong>${esc(d.departLocal)}</strong>` }))
      + (d.message ? p(esc(d.message)) : '') + button(d.ackUrl, t('mail.decision.button')) + p(esc(t('mail.decision.press'))) + safetyHtml(d.eclipseKind, d.locale),
    `${hello((k, v) => t(k, v))}\n\n${t('mail.decision.observe', { trip: d.tripTitle, site: d.siteName })}\n${t('mail.decision.meet', meet)}\n${d.message ? `\n${d.message}\n` : ''}\n${t('mail.decision.confirmText')}\n${d.ackUrl}\n\n${safetyText(d.eclipseKind, d.locale)}`, t('mail.footer'))
}

/** The decision as an SMS, and as a push notification's title and body, in the recipient's language. */
export function decisionShortTexts(d: { tripTitle: string; siteName: string; meetingPoint: string; departLocal: string; ackUrl: string; locale?: string }) {
  const t = translator(d.locale)
  return {
    sms: t('mail.decision.sms', { trip: d.tripTitle, site: d.siteName, place: d.meetingPoint, time: d.departLocal.slice(0, 16).replace('T', ' '), url: d.ackUrl }),
    pushTitle: t('mail.decision.pushTitle', { site: d.siteName }),
    pushBody: t('mail.decision.pushBody', { place: d.meetingPoint, time: d.departLocal.slice(11, 16) }),
  }
}

/** Travellers whose participant details are incomplete (45 and 14 days before the trip, or an organiser's nudge). */
export function participantsReminderMail(d: { name: string; tripTitle: string; startDate: string; daysBefore: number | null; missing: Array<{ seat: number; fields: RequiredField[] }>; bookingUrl: string; locale?: string }): Mail {
  const t = translator(d.locale)
  const th = htmlT(t)
  const date = dateIn(d.startDate, d.locale)
  const when = d.daysBefore === null ? t('mail.participants.whenBefore', { date }) : t('mail.participants.whenIn', { days: d.daysBefore, date })
  const lines = d.missing.map((m) => t('mail.participants.seat', { seat: m.seat, fields: m.fields.map((f) => t(`mail.participants.field.${FIELD_MESSAGE[f]}`)).join(', ') }))
  return frame(t('mail.participants.subject', { trip: d.tripTitle }),
    p(th('mail.hello', { name: d.name })) + p(th('mail.participants.lead', { when }))
    + `<ul style="margin:0 0 12px 18px;padding:0">${lines.map((l) => `<li>${esc(l)}</li>`).join('')}</ul>` + button(d.bookingUrl, t('mail.participants.button')),
    `${t('mail.hello', { name: d.name })}\n\n${t('mail.participants.lead', { when })}\n${lines.map((l) => `- ${l}`).join('\n')}\n\n${d.bookingUrl}`, t('mail.footer'))
}

/** Each required participant field's message key under mail.participants.field (message keys hold no dots). */
const FIELD_MESSAGE: Record<RequiredField, string> = {
  fullName: 'fullName', dateOfBirth: 'dateOfBirth', nationality: 'nationality', passportNumber: 'passportNumber', passportExpiry: 'passportExpiry',
  mobilePhone: 'mobilePhone', 'emergencyContact.name': 'emergencyName', 'emergencyContact.phone': 'emergencyPhone',
  'emergencyContact.relation': 'emergencyRelation', 'room.type': 'roomType',
}
