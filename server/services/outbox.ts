import { randomUUID } from 'node:crypto'
import type { Kysely, Transaction } from 'kysely'
import nodemailer, { type Transporter } from 'nodemailer'
import { isPostgres } from '../database/dialect'
import type { Database } from '../database/schema'
import type { Mail } from './mailTemplates'
import { nowDate, nowIso, nowMs } from './clock'
import { seal, unseal } from './sealed'

type Db = Kysely<Database> | Transaction<Database>

export interface OutgoingMail extends Mail {
  kind: string
  to: { email: string; name?: string }
  attachments?: Array<{ filename: string; content: string; contentType: string }>
  bookingId?: number | null
  tripId?: number | null
  /** Scheduled mail: at most one message per key. */
  dedupeKey?: string
  /**
   * A one-time token (a confirmation, reset or invitation link). The bodies carry SECRET_TOKEN where
   * it goes; the token itself is kept sealed in the row and put in only when the message is sent.
   */
  secret?: string
  /** The language the message is written in (the recipient's account locale); English when unset. */
  locale?: string
}

/** Where a message's one-time token goes in its bodies (a link is written `${appUrl}/path?token=${SECRET_TOKEN}`). */
export const SECRET_TOKEN = '{{secret_token}}'

/** The sealing context of a message's token: bound to its Message-ID, so it opens in no other row. */
export const secretContext = (messageId: string) => `outbox:${messageId}`

export class SecretInBodyError extends Error {}

/** Writes a message to the outbox, inside the caller's transaction: it goes out only if the event commits. */
export async function enqueueMail(db: Db, m: OutgoingMail): Promise<void> {
  await db.insertInto('outbox').values(outboxValues(m)).onConflict((oc) => oc.column('dedupe_key').doNothing()).execute()
}

/** The outbox row for a message, checked as enqueueMail checks it (for a caller that writes it within a larger statement). */
export function outboxValues(m: OutgoingMail) {
  const messageId = `<${randomUUID()}@umbrafield>`
  if (m.secret !== undefined) {
    // Tokens never rest in clear text: the bodies must hold the placeholder, never the token.
    if (m.secret.length < 16 || m.html.includes(m.secret) || m.text.includes(m.secret) || m.subject.includes(m.secret)) throw new SecretInBodyError('A one-time token must not be written into a message body')
    if (!m.text.includes(SECRET_TOKEN)) throw new SecretInBodyError('A message with a one-time token must say where it goes')
  }
  return {
    message_id: messageId, sealed_secret: m.secret !== undefined ? seal(m.secret, secretContext(messageId)) : null, dedupe_key: m.dedupeKey ?? null, kind: m.kind, to_email: m.to.email, to_name: m.to.name ?? '',
    subject: m.subject, html: m.html, text: m.text, attachments: JSON.stringify(m.attachments ?? []), next_attempt_at: nowIso(),
    last_error: null, booking_id: m.bookingId ?? null, trip_id: m.tripId ?? null, sending_since: null, sent_at: null,
    locale: m.locale ?? 'en',
  }
}

export interface MailConfig { host: string; port: number; secure: boolean; user?: string; pass?: string; from: string }

export function makeTransport(c: MailConfig): Transporter {
  return nodemailer.createTransport({
    host: c.host, port: c.port, secure: c.secure, auth: c.user ? { user: c.user, pass: c.pass } : undefined,
    connectionTimeout: 5000, greetingTimeout: 5000, socketTimeout: 10000,
  })
}

export const OUTBOX = {
  maxAttempts: Number(process.env.UMBRAFIELD_MAIL_MAX_ATTEMPTS || 10),
  baseBackoffMs: Number(process.env.UMBRAFIELD_MAIL_BACKOFF_MS || 5000),
  capBackoffMs: 3600_000,
  /** A message left "sending" this long (a crash mid-send) is tried again, with the same Message-ID. */
  stuckAfterMs: 120_000,
}

/**
 * Sends what is due (at most `limit`), one message at a time: claim (queued → sending), send, and mark sent only
 * after the SMTP server accepted it. Failures retry with exponential backoff, then give up as failed.
 */
export async function processOutbox(db: Kysely<Database>, transport: Transporter, from: string, limit = 20): Promise<{ sent: number; failed: number }> {
  const now = nowDate()
  await db.updateTable('outbox').set({ status: 'queued', sending_since: null })
    .where('status', '=', 'sending').where('sending_since', '<', new Date(now.getTime() - OUTBOX.stuckAfterMs).toISOString()).execute()
  const dueQuery = (q: Db) => q.selectFrom('outbox').selectAll().where('status', '=', 'queued').where('next_attempt_at', '<=', now.toISOString())
    .orderBy('id').limit(1)
  /**
   * Claims the next due message (queued → sending), stamping sending_since at this moment, just
   * before it is sent. Claiming one at a time (not a batch up front) keeps the stamp honest: with a
   * slow SMTP server, the last message of a batch stamped at its start would look stuck and be sent
   * again by another worker while this one is still getting to it.
   */
  const claimNext = async () => {
    if (isPostgres(db)) {
      // Several instances: FOR UPDATE SKIP LOCKED, so two workers never pick the same message and
      // neither waits on the other's row.
      return db.transaction().execute(async (trx) => {
        const m = await dueQuery(trx).forUpdate().skipLocked().executeTakeFirst()
        if (m) await trx.updateTable('outbox').set({ status: 'sending', sending_since: nowIso() }).where('id', '=', m.id).execute()
        return m
      })
    }
    // SQLite: a conditional update (queued → sending); a row another worker claimed first is skipped.
    for (;;) {
      const m = await dueQuery(db).executeTakeFirst()
      if (!m) return undefined
      const claim = await db.updateTable('outbox').set({ status: 'sending', sending_since: nowIso() })
        .where('id', '=', m.id).where('status', '=', 'queued').executeTakeFirst()
      if (claim.numUpdatedRows) return m
    }
  }
  let sent = 0, failed = 0
  for (let n = 0; n < limit; n++) {
    const m = await claimNext()
    if (!m) break
    let bodies: { html: string; text: string }
    try {
      bodies = withSecret(m)
    } catch (e) {
      // The link cannot be put back (its token was cleared, or its key is gone): sending the
      // placeholder would help nobody. The person asks for a new link.
      await db.updateTable('outbox').set({ status: 'failed', last_error: (e as Error).message, sending_since: null, sealed_secret: null }).where('id', '=', m.id).execute()
      failed++
      continue
    }
    try {
      await transport.sendMail({
        messageId: m.message_id, from, to: m.to_name ? { name: m.to_name, address: m.to_email } : m.to_email,
        subject: m.subject, html: bodies.html, text: bodies.text, attachments: JSON.parse(m.attachments),
      })
    } catch (e) {
      const attempts = m.attempts + 1
      const give = attempts >= OUTBOX.maxAttempts
      const wait = Math.min(OUTBOX.capBackoffMs, OUTBOX.baseBackoffMs * 2 ** (attempts - 1))
      await db.updateTable('outbox').set({
        status: give ? 'failed' : 'queued', attempts, last_error: (e as Error).message.slice(0, 500), sending_since: null,
        next_attempt_at: new Date(nowMs() + wait).toISOString(),
        // Given up: the link is dropped with it (the person asks for a new one).
        ...(give ? { sealed_secret: null } : {}),
      }).where('id', '=', m.id).execute()
      failed++
      continue
    }
    // The SMTP server has the message (and the token is now in the recipient's mailbox, cleared here
    // as it is recorded): only recording that may fail now (the database restarting).
    // That is never a failed send, or the message would go out twice; keep trying to record it.
    await markSent(db, m.id, m.attempts + 1)
    sent++
  }
  return { sent, failed }
}

/** Tries to record this long before leaving the row "sending" (it is then sent again after stuckAfterMs). */
const MARK_SENT_TRIES = 60
const MARK_SENT_PAUSE_MS = 500

async function markSent(db: Kysely<Database>, id: number, attempts: number): Promise<void> {
  for (let k = 1; ; k++) {
    try {
      await db.updateTable('outbox').set({ status: 'sent', sent_at: nowIso(), attempts, last_error: null, sending_since: null, sealed_secret: null }).where('id', '=', id).execute()
      return
    } catch (e) {
      if (k >= MARK_SENT_TRIES) throw e
      await new Promise((r) => setTimeout(r, MARK_SENT_PAUSE_MS))
    }
  }
}

/** The bodies as sent: the sealed token opened and put where the placeholder stands. */
function withSecret(m: { message_id: string; html: string; text: string; sealed_secret: string | null }): { html: string; text: string } {
  const needs = m.text.includes(SECRET_TOKEN) || m.html.includes(SECRET_TOKEN)
  if (!needs) return { html: m.html, text: m.text }
  if (!m.sealed_secret) throw new Error('The one-time link in this message has been cleared: ask for a new one')
  const token = unseal(m.sealed_secret, secretContext(m.message_id))
  // Tokens are base64url: nothing in them needs escaping in HTML or in a URL.
  return { html: m.html.split(SECRET_TOKEN).join(token), text: m.text.split(SECRET_TOKEN).join(token) }
}

/**
 * Queues a failed message again. 'link_gone' when it carried a one-time link whose token was
 * cleared on giving up: resending it would deliver a dead link, so the person asks for a new one.
 */
export async function retryMessage(db: Kysely<Database>, id: number): Promise<'ok' | 'not_failed' | 'link_gone'> {
  const row = await db.selectFrom('outbox').select(['status', 'text', 'html', 'sealed_secret']).where('id', '=', id).executeTakeFirst()
  if (!row || row.status !== 'failed') return 'not_failed'
  if ((row.text.includes(SECRET_TOKEN) || row.html.includes(SECRET_TOKEN)) && !row.sealed_secret) return 'link_gone'
  const r = await db.updateTable('outbox').set({ status: 'queued', attempts: 0, next_attempt_at: nowIso(), last_error: null })
    .where('id', '=', id).where('status', '=', 'failed').executeTakeFirst()
  return r.numUpdatedRows ? 'ok' : 'not_failed'
}

export async function listOutbox(db: Kysely<Database>, limit = 200) {
  const rows = await db.selectFrom('outbox').select(['id', 'kind', 'to_email', 'to_name', 'subject', 'status', 'attempts', 'last_error', 'created_at', 'sent_at', 'next_attempt_at', 'booking_id', 'trip_id', 'locale'])
    .orderBy('id', 'desc').limit(limit).execute()
  return rows.map((r) => ({
    id: r.id, kind: r.kind, to: r.to_name ? `${r.to_name} <${r.to_email}>` : r.to_email, subject: r.subject, status: r.status, attempts: r.attempts,
    lastError: r.last_error, createdAt: r.created_at, sentAt: r.sent_at, nextAttemptAt: r.next_attempt_at, bookingId: r.booking_id, tripId: r.trip_id, locale: r.locale,
  }))
}
