import { url } from '@nuxt/test-utils/e2e'
import { simpleParser } from 'mailparser'
import { getDocument } from 'pdfjs-dist/legacy/build/pdf.mjs'
import { afterAll, describe, expect, it } from 'vitest'
import { openDatabase } from '../../server/database/connection'
import { api, caughtMail, MAIL_CATCHER, ORGANISER, signIn, TEST_DB, TRAVELLER, TRAVELLER2, useApp } from './app'

// A traveller who reads German gets the itinerary, its calendar file and the documents in German;
// English readers keep the English text.
const { dbTarget } = await useApp()
const db = openDatabase(dbTarget)
afterAll(() => db.destroy())

async function pdfText(buf: ArrayBuffer): Promise<string> {
  const doc = await getDocument({ data: new Uint8Array(buf), useSystemFonts: false, isEvalSupported: false }).promise
  const pages: string[] = []
  for (let i = 1; i <= doc.numPages; i++) {
    const content = await (await doc.getPage(i)).getTextContent()
    pages.push(content.items.map((it) => ('str' in it ? it.str : '')).join(' '))
  }
  return pages.join('\n')
}

/** Unfolds RFC 5545 lines and returns each VEVENT's properties (values with their escapes undone). */
function icsEvents(text: string) {
  const lines = text.replace(/\r?\n[ \t]/g, '').split(/\r?\n/).filter(Boolean)
  const events: Array<Record<string, string>> = []
  for (const l of lines) {
    if (l === 'BEGIN:VEVENT') events.push({})
    const i = l.indexOf(':')
    if (events.length && i > 0) events[events.length - 1]![l.slice(0, i).split(';')[0]!] = l.slice(i + 1).replace(/\\n/gi, '\n').replace(/\\([,;\\])/g, '$1')
  }
  return events
}

describe(`documents in the reader's language (${TEST_DB})`, () => {
  it('a German traveller gets a German itinerary e-mail with a German calendar file; the outbox records the language', async () => {
    await db.updateTable('users').set({ locale: 'de' }).where('email', '=', TRAVELLER2).execute()
    const org = await signIn(ORGANISER)
    const r = await api('/api/trips/1/itinerary', { method: 'POST', body: { confirm: true }, cookie: org })
    expect(r.status).toBe(200)
    // This app's own mail: its briefing link carries this app's port (the catcher is shared by every test file).
    const mail = await caughtMail(TRAVELLER2, /^Ihr Reiseplan zur Finsternis: /, { containing: `:${new URL(url('/')).port}/trips/1/briefing` })
    expect(mail.text).toMatch(/^Ihr Reiseplan zur Finsternis: /)
    expect(mail.text).toContain('Guten Tag ')
    expect(mail.text).toContain('Hier ist Ihr Reiseplan für')
    expect(mail.text).toContain('TREFFPUNKT')
    expect(mail.text).toContain('KONTAKTZEITEN')
    expect(mail.text).toContain('C2 — Beginn der Totalität')
    expect(mail.text).toContain('AUGENSCHUTZ')
    expect(mail.text).toContain('ISO 12312-2')
    expect(mail.text).toContain('Örtliche Vorschriften und fachkundiger Rat haben Vorrang.')
    expect(mail.text).toContain('Ortszeiten folgen der Uhr am Standort')
    expect(mail.text).toContain('Versandt von Umbrafield')
    // Money in German form: the decimal comma and the symbol after the amount.
    expect(mail.text).toMatch(/Bezahlt: [\d.]+,\d\d\s\S+; noch offen: [\d.]+,\d\d\s\S+\./)
    for (const en of ['Hello ', 'Here is your itinerary', 'MEETING POINT', 'EYE SAFETY', 'totality begins', 'Local rules and qualified advice']) expect(mail.text).not.toContain(en)
    expect(mail.html).toContain('Treffpunkt</h2>')
    expect(mail.html).toContain('Augenschutz')
    expect(mail.html).not.toContain('Eye safety')

    // The calendar file, read from the raw message.
    const raw = await fetch(`${MAIL_CATCHER}/api/email/${mail.id}/download`)
    const parsed = await simpleParser(Buffer.from(await raw.arrayBuffer()))
    const ics = parsed.attachments.find((a) => a.contentType.startsWith('text/calendar'))!.content.toString('utf8')
    const events = icsEvents(ics)
    expect(events).toHaveLength(6)
    expect(events.find((e) => e.SUMMARY!.startsWith('Treffpunkt: '))).toBeTruthy()
    const c2 = events.find((e) => e.SUMMARY!.startsWith('C2 — Beginn der Totalität'))!
    expect(c2.DESCRIPTION).toContain('Totale Sonnenfinsternis vom ')
    expect(c2.DESCRIPTION).toContain('Augenschutz: ')
    expect(c2.DESCRIPTION).toContain('ISO 12312-2')
    expect(c2.DESCRIPTION).toContain('Zeiten in UTC.')
    for (const e of events) {
      expect(e.SUMMARY).not.toMatch(/totality|partial phase|Maximum eclipse|Meet: /)
      expect(e.DESCRIPTION).not.toMatch(/Eye safety|Total solar eclipse|meeting point|Times are UTC/)
    }

    // Organisers see which language each message went out in.
    const out = await api('/api/outbox', { cookie: org })
    const row = out.body.data.find((m: { to: string; kind: string }) => m.kind === 'itinerary' && m.to.includes(TRAVELLER2))
    expect(row.locale).toBe('de')
    expect(row.subject).toMatch(/^Ihr Reiseplan/)
    const people = await api('/api/users', { cookie: org })
    expect(people.body.data.find((u: { email: string }) => u.email === TRAVELLER2).locale).toBe('de')
    expect(people.body.data.find((u: { email: string }) => u.email === ORGANISER).locale).toBe('en')
  })

  it('the timetable and briefing PDF reads German for a German account (whatever the browser asks); English stays English', async () => {
    const org = await signIn(ORGANISER)
    const get = async (headers: Record<string, string>) => pdfText(await (await fetch(url('/api/trips/1/timetable.pdf'), { headers: { cookie: org, ...headers } })).arrayBuffer())
    const en = await get({})
    expect(en).toContain('CONTACT TIMETABLE')
    expect(en).toContain('Eye safety')
    for (const line of ['The air cools', 'The eclipse ends (C4)', 'A red torch']) expect(en, line).toContain(line)

    // A signed-in account's own language decides, before the cookie and Accept-Language.
    await db.updateTable('users').set({ locale: 'de' }).where('email', '=', ORGANISER).execute()
    try {
      const de = await get({ 'accept-language': 'fr' })
      for (const heading of ['KONTAKTZEITEN · HAUPTSTANDORT', 'KONTAKT', 'ORTSZEIT', 'Zeichen', 'Augenschutz', 'BRIEFING FÜR TEILNEHMENDE', 'Wohin Sie schauen', 'Was Sie mitbringen sollten', 'C2 — Beginn der Totalität', 'Perlschnurphänomen', 'Diamantring', 'Örtliche Vorschriften']) {
        expect(de, heading).toContain(heading)
      }
      expect(de).toMatch(/Filter ab/)
      // The briefing's own sentences: the steps, the sky's history and the default list of what to bring.
      for (const line of ['Die Luft kühlt ab', 'Die Finsternis endet (C4)', 'Die Brille bleibt bis zum Schluss auf', 'Taschenlampe mit Rotlicht', 'Wasser']) expect(de, line).toContain(line)
      expect(de).toMatch(/Statistik, keine\s+Vorhersage|noch keine\s+Bewölkungsdaten/)
      // The sky diagram labels the demo's bright objects in German (Mercury → Merkur, Arcturus → Arktur).
      expect(de).toContain('Merkur')
      expect(de).not.toMatch(/Mercury|Arcturus/)
      for (const line of ['The air cools', 'The eclipse ends (C4)', 'Viewers on until the very end', 'A red torch', 'not a forecast', 'No cloud history']) expect(de, line).not.toContain(line)
      expect(de).not.toContain('CONTACT TIMETABLE')
      expect(de).not.toContain('Eye safety')
      // Numbers with the German decimal comma (magnitude to four places).
      expect(de).toMatch(/Größe \d,\d{4}/)
    } finally {
      await db.updateTable('users').set({ locale: 'en' }).where('email', '=', ORGANISER).execute()
    }
  })
  // On PostgreSQL a hold is written in one statement (server/services/holdStatement.ts); on SQLite in a transaction: both must speak French.
  it('a French traveller gets the hold e-mail in French, with the French safety text', async () => {
    await db.updateTable('users').set({ locale: 'fr' }).where('email', '=', TRAVELLER).execute()
    const hold = await api('/api/trips/1/bookings', { method: 'POST', body: { seats: 2 }, cookie: await signIn(TRAVELLER) })
    expect(hold.status).toBe(201)
    const mail = await caughtMail(TRAVELLER, /^Places retenues/, { containing: `:${new URL(url('/')).port}/bookings/${hold.body.id}` })
    expect(mail.text).toContain('Bonjour ')
    expect(mail.text).toContain('Nous vous réservons 2 place(s) jusqu’à ')
    expect(mail.text).toContain('PROTECTION DES YEUX')
    expect(mail.text).toContain('ISO 12312-2')
    expect(mail.html).toContain('<strong>2 places</strong>')
    expect(mail.text).not.toMatch(/Hello|We are holding|EYE SAFETY/)
    const out = await api('/api/outbox', { cookie: await signIn(ORGANISER) })
    expect(out.body.data.find((m: { kind: string; bookingId: number }) => m.kind === 'booking-held' && m.bookingId === hold.body.id).locale).toBe('fr')
  })

  it('a German account gets its password-reset e-mail in German; the outbox records the language', async () => {
    await db.updateTable('users').set({ locale: 'de' }).where('email', '=', TRAVELLER2).execute()
    const r = await api('/api/auth/password-reset', { method: 'POST', body: { email: TRAVELLER2 } })
    expect(r.status).toBe(202)
    const mail = await caughtMail(TRAVELLER2, /^Wählen Sie ein neues Passwort$/, { containing: `:${new URL(url('/')).port}/reset-password?token=` })
    expect(mail.text).toMatch(/^Wählen Sie ein neues Passwort\n=+\n\nGuten Tag /)
    expect(mail.text).toContain('Jemand – hoffentlich Sie – hat ein neues Passwort für Ihr Umbrafield-Konto angefordert.')
    expect(mail.text).toMatch(/Der Link funktioniert einmal und \d+ Minuten lang; eine neuere Anfrage ersetzt ihn\./)
    expect(mail.text).toContain('Versandt von Umbrafield')
    expect(mail.html).toContain('>Neues Passwort wählen</a>')
    for (const en of ['Hello ', 'Choose a new password', 'The link works once', 'Sent by Umbrafield']) {
      expect(mail.text).not.toContain(en)
      expect(mail.html).not.toContain(en)
    }
    const out = await api('/api/outbox', { cookie: await signIn(ORGANISER) })
    expect(out.body.data.filter((m: { kind: string; to: string }) => m.kind === 'password-reset' && m.to.includes(TRAVELLER2)).at(-1).locale).toBe('de')
  })

  it('a German traveller is told of new dates and a new meeting point in German (dates and local time in German form); an English one in English', async () => {
    await db.updateTable('users').set({ locale: 'de' }).where('email', '=', TRAVELLER2).execute()
    const demo = await db.selectFrom('trips').select(['workspace_id', 'primary_site_id']).where('id', '=', 1).executeTakeFirstOrThrow()
    const org = await signIn(ORGANISER)
    const title = `Geänderte Reise ${Date.now()} (test)`
    const created = await api('/api/trips', { method: 'POST', cookie: org, body: {
      workspaceId: demo.workspace_id, primarySiteId: demo.primary_site_id, backupSiteIds: [], title, startDate: '2027-07-31', endDate: '2027-08-03',
      seats: 10, priceMinor: 200_000, depositMinor: 40_000, currency: 'EUR', balanceDueDate: '2027-05-01',
      cancellationTiers: [{ until: '2099-01-01', refundPct: 100 }], minGroupSize: 2,
      meetingPoint: { name: 'Altes Hotel (test)', lat: 25.69, lon: 32.64, time: '2027-08-02T06:30:00+03:00' },
    } })
    expect(created.status, JSON.stringify(created.body)).toBe(201)
    const id = created.body.id as number
    expect((await api(`/api/trips/${id}/publish`, { method: 'POST', cookie: org })).status).toBe(200)
    expect((await api(`/api/trips/${id}/bookings`, { method: 'POST', body: { seats: 1 }, cookie: await signIn(TRAVELLER2) })).status).toBe(201)
    await db.updateTable('users').set({ locale: 'en' }).where('email', '=', TRAVELLER).execute()
    expect((await api(`/api/trips/${id}/bookings`, { method: 'POST', body: { seats: 1 }, cookie: await signIn(TRAVELLER) })).status).toBe(201)
    const r = await api(`/api/trips/${id}`, { method: 'PATCH', cookie: org,
      body: { startDate: '2028-07-20', endDate: '2028-07-25', meetingPoint: { name: 'Hafentor (test)', lat: 25.7, lon: 32.65, time: '2028-07-22T05:00:00+03:00' } } })
    expect(r.status, JSON.stringify(r.body)).toBe(200)
    expect(r.body.notified).toBe(2)

    const de = await caughtMail(TRAVELLER2, /^Ihre Reise wurde geändert: /, { containing: `:${new URL(url('/')).port}/trips/${id}` })
    expect(de.subject).toBe(`Ihre Reise wurde geändert: ${title}`)
    expect(de.text).toContain(`Der Veranstalter hat ${title} geändert:`)
    expect(de.text).toMatch(/Erster Tag\n {2}bisher: 31\. Juli 2027\n {2}neu: 20\. Juli 2028/)
    expect(de.text).toMatch(/Letzter Tag\n {2}bisher: 3\. August 2027\n {2}neu: 25\. Juli 2028/)
    expect(de.text).toContain('Treffpunkt\n  bisher: Altes Hotel (test), 2. August 2027 06:30 Ortszeit (UTC+03:00, Africa/Cairo)')
    expect(de.text).toContain('neu: Hafentor (test), 22. Juli 2028 05:00 Ortszeit (UTC+03:00, Africa/Cairo)')
    expect(de.text).toContain('Ihre Buchung, der Preis und die Bedingungen bleiben wie vereinbart.')
    expect(de.html).toContain('<th align="left">Änderung</th><th align="left">Bisher</th><th align="left">Neu</th>')
    expect(de.html).toContain('>Reise ansehen</a>')
    for (const en of ['Hello ', 'First day', 'was: ', 'local time', 'Your booking', 'See the trip']) expect(de.text + de.html).not.toContain(en)

    const en = await caughtMail(TRAVELLER, /^Your trip has changed: /, { containing: `:${new URL(url('/')).port}/trips/${id}` })
    expect(en.text).toMatch(/First day\n {2}was: 2027-07-31\n {2}now: 2028-07-20/)
    expect(en.text).toContain('was: Altes Hotel (test), 2027-08-02 06:30 local time (UTC+03:00, Africa/Cairo)')
    expect(en.html).toContain('<th align="left">What</th><th align="left">Was</th><th align="left">Now</th>')

    const out = await api('/api/outbox', { cookie: org })
    const rows = out.body.data.filter((m: { kind: string; tripId: number }) => m.kind === 'trip-changed' && m.tripId === id)
    expect(rows.map((m: { to: string; locale: string }) => [m.to.includes(TRAVELLER2) ? 'de' : 'en', m.locale]).sort()).toEqual([['de', 'de'], ['en', 'en']])
  })
})
