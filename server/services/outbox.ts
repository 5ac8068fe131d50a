import { randomUUID } from 'node:crypto'
import type { Kysely, Transaction } from 'kysely'
import nodemailer, { type Transporter } from 'nodemailer'
import { isPostgres } from '../database/dialect'
import type { Database } from '../database/schema'
import type { Mail } from './mailTemplates'
import { nowDate, nowIso, nowMs } from './clock'

type Db = Kysely<Database> | Transaction<Database>

export interface OutgoingMail extends Mail {
  kind: string
  to: { email: string; name?: string }
  attachments?: Array<{ filename: string; content: string; contentType: string }>
  bookingId?: number | null
  tripId?: number | null
  /** Scheduled mail: at most one message per key. */
  dedupeKey?: string
}

/** Writes a message to the outbox, inside the caller's transaction: it goes out only if the event commits. */
export async function enqueueMail(db: Db, m: OutgoingMail): Promise<void> {
  await db.insertInto('outbox').values({
    message_id: `<${randomUUID()}@umbrafield>`, dedupe_key: m.dedupeKey ?? null, kind: m.kind, to_email: m.to.email, to_name: m.to.name ?? '',
    subject: m.subject, html: m.html, text: m.text, attachments: JSON.stringify(m.attachments ?? []), next_attempt_at: nowIso(),
    last_error: null, booking_id: m.bookingId ?? null, trip_id: m.tripId ?? null, sending_since: null, sent_at: null,
  }).onConflict((oc) => oc.column('dedupe_key').doNothing()).execute()
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
 * Sends what is due, one message at a time: claim (queued → sending), send, and mark sent only
 * after the SMTP server accepted it. Failures retry with exponential backoff, then give up as failed.
 */
export async function processOutbox(db: Kysely<Database>, transport: Transporter, from: string, limit = 20): Promise<{ sent: number; failed: number }> {
  const now = nowDate()
  await db.updateTable('outbox').set({ status: 'queued', sending_since: null })
    .where('status', '=', 'sending').where('sending_since', '<', new Date(now.getTime() - OUTBOX.stuckAfterMs).toISOString()).execute()
  const dueQuery = (q: Db) => q.selectFrom('outbox').selectAll().where('status', '=', 'queued').where('next_attempt_at', '<=', now.toISOString())
    .orderBy('id').limit(limit)
  let due: Awaited<ReturnType<ReturnType<typeof dueQuery>['execute']>>
  if (isPostgres(db)) {
    // PostgreSQL, several instances: claim a batch in one transaction with FOR UPDATE SKIP LOCKED, so
    // two workers never pick the same message and neither waits on the other's rows.
    due = await db.transaction().execute(async (trx) => {
      const rows = await dueQuery(trx).forUpdate().skipLocked().execute()
      if (rows.length) {
        await trx.updateTable('outbox').set({ status: 'sending', sending_since: nowIso() }).where('id', 'in', rows.map((r) => r.id)).execute()
      }
      return rows
    })
  } else {
    // SQLite: one row at a time with a conditional update (queued → sending); a row another worker
    // claimed first is skipped.
    due = []
    for (const m of await dueQuery(db).execute()) {
      const claim = await db.updateTable('outbox').set({ status: 'sending', sending_since: nowIso() })
        .where('id', '=', m.id).where('status', '=', 'queued').executeTakeFirst()
      if (claim.numUpdatedRows) due.push(m)
    }
  }
  let sent = 0, failed = 0
  for (const m of due) {
    try {
      await transport.sendMail({
        messageId: m.message_id, from, to: m.to_name ? { name: m.to_name, address: m.to_email } : m.to_email,
        subject: m.subject, html: m.html, text: m.text, attachments: JSON.parse(m.attachments),
      })
    } catch (e) {
      const attempts = m.attempts + 1
      const give = attempts >= OUTBOX.maxAttempts
      const wait = Math.min(OUTBOX.capBackoffMs, OUTBOX.baseBackoffMs * 2 ** (attempts - 1))
      await db.updateTable('outbox').set({
        status: give ? 'failed' : 'queued', attempts, last_error: (e as Error).message.slice(0, 500), sending_since: null,
        next_attempt_at: new Date(nowMs() + wait).toISOString(),
      }).where('id', '=', m.id).execute()
      failed++
      continue
    }
    // The SMTP server has the message: only recording that may fail now (the database restarting).
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
      await db.updateTable('outbox').set({ status: 'sent', sent_at: nowIso(), attempts, last_error: null, sending_since: null }).where('id', '=', id).execute()
      return
    } catch (e) {
      if (k >= MARK_SENT_TRIES) throw e
      await new Promise((r) => setTimeout(r, MARK_SENT_PAUSE_MS))
    }
  }
}

export async function retryMessage(db: Kysely<Database>, id: number): Promise<boolean> {
  const r = await db.updateTable('outbox').set({ status: 'queued', attempts: 0, next_attempt_at: nowIso(), last_error: null })
    .where('id', '=', id).where('status', '=', 'failed').executeTakeFirst()
  return !!r.numUpdatedRows
}

export async function listOutbox(db: Kysely<Database>, limit = 200) {
  const rows = await db.selectFrom('outbox').select(['id', 'kind', 'to_email', 'to_name', 'subject', 'status', 'attempts', 'last_error', 'created_at', 'sent_at', 'next_attempt_at', 'booking_id', 'trip_id'])
    .orderBy('id', 'desc').limit(limit).execute()
  return rows.map((r) => ({
    id: r.id, kind: r.kind, to: r.to_name ? `${r.to_name} <${r.to_email}>` : r.to_email, subject: r.subject, status: r.status, attempts: r.attempts,
    lastError: r.last_error, createdAt: r.created_at, sentAt: r.sent_at, nextAttemptAt: r.next_attempt_at, bookingId: r.booking_id, tripId: r.trip_id,
  }))
}
