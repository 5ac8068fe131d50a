import type { Kysely, Transaction } from 'kysely'
import twilio from 'twilio'
import type RequestClient from 'twilio/lib/base/RequestClient'
import webpush from 'web-push'
import { isPostgres } from '../database/dialect'
import type { Database } from '../database/schema'
import { nowDate, nowIso, nowMs } from './clock'
import { messageSecretContext, smsContext, VAPID_SETTING, vapidContext } from './decisionContexts'
import { SECRET_TOKEN } from './outbox'
import { seal, unseal } from './sealed'
import { getSetting } from './settings'

type Db = Kysely<Database> | Transaction<Database>
type RequestOptions<T> = RequestClient.RequestOptions<T>

/**
 * The SMS and push side of the decision notices: the same at-least-once queue as the outbox (claim
 * one message at a time, mark sent only after the provider accepted it, retry with exponential
 * backoff, give up after the last attempt), with the acknowledgement token sealed beside a
 * placeholder until the message goes.
 */
export const NOTICE_QUEUE = {
  maxAttempts: Number(process.env.UMBRAFIELD_NOTICE_MAX_ATTEMPTS || 10),
  baseBackoffMs: Number(process.env.UMBRAFIELD_NOTICE_BACKOFF_MS || 5000),
  capBackoffMs: 3600_000,
  stuckAfterMs: 120_000,
}

/** Sends one SMS; resolves with the provider's id for it. */
export type SmsSender = (to: string, body: string) => Promise<string>
/** Sends one push; resolves with the push service's status. */
export type PushSender = (sub: { endpoint: string; p256dh: string; auth: string }, payload: string) => Promise<number>

export interface SmsConfig { accountSid: string; authToken: string; from: string; apiBase?: string }

/** SMS settings from the environment, or null when none are set (SMS then waits in the queue). */
export function smsConfigFromEnv(env = process.env): SmsConfig | null {
  const accountSid = env.NUXT_SMS_ACCOUNT_SID, authToken = env.NUXT_SMS_AUTH_TOKEN, from = env.NUXT_SMS_FROM
  if (!accountSid || !authToken || !from) return null
  return { accountSid, authToken, from, apiBase: env.NUXT_SMS_API_BASE || undefined }
}

/**
 * The Twilio SDK's client. With `apiBase` (a local fake only) its requests go there instead of
 * https://api.twilio.com, through the SDK's own request client: same paths, form encoding and auth.
 */
export function twilioSender(c: SmsConfig): SmsSender {
  let httpClient: InstanceType<typeof twilio.RequestClient> | undefined
  if (c.apiBase) {
    const base = c.apiBase.replace(/\/$/, '')
    class LocalBase extends twilio.RequestClient {
      override request<TData>(opts: RequestOptions<TData>) {
        return super.request<TData>({ ...opts, uri: opts.uri.replace(/^https:\/\/[^/]+/, base) })
      }
    }
    httpClient = new LocalBase({ timeout: 10_000 })
  }
  const client = twilio(c.accountSid, c.authToken, { httpClient, timeout: 10_000 })
  return async (to, body) => (await client.messages.create({ to, from: c.from, body })).sid
}

const VAPID_KEY = VAPID_SETTING

/**
 * The VAPID key pair (RFC 8292) this app signs pushes with: made on first need and kept in
 * app_settings, the private key sealed. Two instances starting together keep whichever was stored first.
 */
export async function vapidKeys(db: Kysely<Database>): Promise<{ publicKey: string; privateKey: string }> {
  let stored = await getSetting<{ publicKey: string; privateKeySealed: string } | null>(db, VAPID_KEY, null)
  if (!stored) {
    const k = webpush.generateVAPIDKeys()
    await db.insertInto('app_settings').values({ key: VAPID_KEY, value: JSON.stringify({ publicKey: k.publicKey, privateKeySealed: seal(k.privateKey, vapidContext) }), updated_at: nowIso(), updated_by: null })
      .onConflict((oc) => oc.column('key').doNothing()).execute()
    stored = await getSetting<{ publicKey: string; privateKeySealed: string } | null>(db, VAPID_KEY, null)
  }
  return { publicKey: stored!.publicKey, privateKey: unseal(stored!.privateKeySealed, vapidContext) }
}

/** A push through web-push's encryption (RFC 8291) and VAPID headers, posted with fetch (any https, or a local http receiver). */
export function webPushSender(keys: { publicKey: string; privateKey: string }, subject: string): PushSender {
  return async (sub, payload) => {
    const req = webpush.generateRequestDetails({ endpoint: sub.endpoint, keys: { p256dh: sub.p256dh, auth: sub.auth } }, payload, {
      vapidDetails: { subject, publicKey: keys.publicKey, privateKey: keys.privateKey }, TTL: 6 * 3600, urgency: 'high',
    })
    const res = await fetch(req.endpoint, { method: req.method, headers: req.headers as Record<string, string>, body: req.body ? new Uint8Array(req.body) : undefined, signal: AbortSignal.timeout(10_000) })
    if (res.status === 404 || res.status === 410) throw new PushGoneError(`The push service says this subscription is gone (${res.status})`)
    if (!res.ok) throw new Error(`Push service answered ${res.status}`)
    return res.status
  }
}
export class PushGoneError extends Error {}

/** A push endpoint the server will not post to (400 naming endpoint). */
export class PushEndpointError extends Error { field = 'endpoint' }

const LOCAL_URL = /^https?:\/\/(localhost|127\.0\.0\.1|\[::1\])(:\d+)?(\/|$)/
/** Hosts on this machine or a private network: a push to them would let a caller make the server post inside. */
const INNER_HOST = /^(localhost|127\.|10\.|192\.168\.|172\.(1[6-9]|2\d|3[01])\.|169\.254\.|0\.|\[(::1?|f[cd][0-9a-f]*:.*|fe80:.*)\])/i

/**
 * Push services are public https endpoints. A local app (the demo, the tests) may also use an http
 * receiver on this machine; a public one refuses anything but https to an outside host.
 */
export function assertPushEndpoint(endpoint: string, appUrl = process.env.NUXT_PUBLIC_APP_URL ?? 'http://localhost:3000') {
  if (LOCAL_URL.test(appUrl)) return
  const u = new URL(endpoint)
  if (u.protocol !== 'https:' || INNER_HOST.test(u.host)) throw new PushEndpointError('endpoint must be a push service\'s https address')
}

/** Registers (or refreshes) a device's push subscription for this user. */
export async function savePushSubscription(db: Kysely<Database>, userId: number, s: { endpoint: string; keys: { p256dh: string; auth: string } }) {
  assertPushEndpoint(s.endpoint)
  const row = { user_id: userId, p256dh: s.keys.p256dh, auth: s.keys.auth, gone_at: null }
  await db.insertInto('push_subscriptions').values({ endpoint: s.endpoint, ...row })
    .onConflict((oc) => oc.column('endpoint').doUpdateSet(row)).execute()
  return { saved: true }
}

/**
 * Sends what is due (at most `limit`), one message at a time. A channel without a sender (SMS not
 * configured) keeps its messages queued.
 */
export async function processNotices(db: Kysely<Database>, senders: { sms: SmsSender | null; push: PushSender | null }, limit = 20): Promise<{ sent: number; failed: number }> {
  const now = nowDate()
  await db.updateTable('decision_messages').set({ status: 'queued', sending_since: null })
    .where('status', '=', 'sending').where('sending_since', '<', new Date(now.getTime() - NOTICE_QUEUE.stuckAfterMs).toISOString()).execute()
  const channels = [...(senders.sms ? ['sms' as const] : []), ...(senders.push ? ['push' as const] : [])]
  if (!channels.length) return { sent: 0, failed: 0 }
  const due = (q: Db) => q.selectFrom('decision_messages').selectAll().where('status', '=', 'queued').where('next_attempt_at', '<=', nowIso())
    .where('channel', 'in', channels).orderBy('id').limit(1)
  const claimNext = async () => {
    if (isPostgres(db)) {
      return db.transaction().execute(async (trx) => {
        const m = await due(trx).forUpdate().skipLocked().executeTakeFirst()
        if (m) await trx.updateTable('decision_messages').set({ status: 'sending', sending_since: nowIso() }).where('id', '=', m.id).execute()
        return m
      })
    }
    for (;;) {
      const m = await due(db).executeTakeFirst()
      if (!m) return undefined
      const c = await db.updateTable('decision_messages').set({ status: 'sending', sending_since: nowIso() }).where('id', '=', m.id).where('status', '=', 'queued').executeTakeFirst()
      if (c.numUpdatedRows) return m
    }
  }
  let sent = 0, failed = 0
  for (let n = 0; n < limit; n++) {
    const m = await claimNext()
    if (!m) break
    let ref: string
    try {
      if (!m.sealed_secret) throw new GiveUpError('The acknowledgement link in this message has been cleared')
      const body = m.body.split(SECRET_TOKEN).join(unseal(m.sealed_secret, messageSecretContext(m.message_id)))
      if (m.channel === 'sms') {
        if (!m.to_sealed) throw new GiveUpError('No number to send to')
        ref = await senders.sms!(unseal(m.to_sealed, smsContext(m.message_id)), body)
      } else {
        const sub = m.push_subscription_id ? await db.selectFrom('push_subscriptions').selectAll().where('id', '=', m.push_subscription_id).where('gone_at', 'is', null).executeTakeFirst() : undefined
        if (!sub) throw new GiveUpError('The device no longer takes pushes')
        ref = String(await senders.push!(sub, body))
      }
    } catch (e) {
      const attempts = m.attempts + 1
      const give = e instanceof GiveUpError || e instanceof PushGoneError || attempts >= NOTICE_QUEUE.maxAttempts
      if (e instanceof PushGoneError && m.push_subscription_id) await db.updateTable('push_subscriptions').set({ gone_at: nowIso() }).where('id', '=', m.push_subscription_id).execute()
      const wait = Math.min(NOTICE_QUEUE.capBackoffMs, NOTICE_QUEUE.baseBackoffMs * 2 ** (attempts - 1))
      await db.updateTable('decision_messages').set({
        status: give ? 'failed' : 'queued', attempts, last_error: (e as Error).message.slice(0, 500), sending_since: null,
        next_attempt_at: new Date(nowMs() + wait).toISOString(), ...(give ? { sealed_secret: null, to_sealed: null } : {}),
      }).where('id', '=', m.id).execute()
      failed++
      continue
    }
    // The provider has it: recording may fail only if the database is away; never count it failed.
    for (let k = 1; ; k++) {
      try {
        await db.updateTable('decision_messages').set({ status: 'sent', sent_at: nowIso(), attempts: m.attempts + 1, last_error: null, sending_since: null, sealed_secret: null, to_sealed: null, provider_ref: ref })
          .where('id', '=', m.id).execute()
        break
      } catch (e) {
        if (k >= 60) throw e
        await new Promise((r) => setTimeout(r, 500))
      }
    }
    sent++
  }
  return { sent, failed }
}
class GiveUpError extends Error {}
