import type { H3Event } from 'h3'
import type { Role, User } from '../database/schema'
import type { PublicUser } from '#shared/schemas/auth'
import { DEFAULT_LOCALE, isLocale } from '#shared/i18n/locales'
import { nowIso, nowMs } from '../services/clock'
import { totpSetupRequired } from '../services/totp'
import { clientAddressFrom, parseTrustedProxies, throttleBucket, type TrustedProxies } from './clientAddress'

export function toPublicUser(u: User): PublicUser {
  return { id: u.id, email: u.email, name: u.name, role: u.role, createdAt: u.created_at, emailConfirmed: !!u.email_confirmed_at, locale: isLocale(u.locale) ? u.locale : DEFAULT_LOCALE }
}

/** Sessions last a week from their last renewal; they are renewed (sliding) at most once an hour. */
export const SESSION_MAX_AGE_SEC = 7 * 24 * 3600
const RENEW_AFTER_MS = 3600_000

/** Starts (or renews) the caller's session under the user's current session version. */
export async function startSession(event: H3Event, user: User) {
  const now = nowIso()
  await replaceUserSession(event, { user: { id: user.id, name: user.name, role: user.role }, version: user.session_version, loggedInAt: now, renewedAt: now })
}

/**
 * The signed-in user, read from the database on every call, so a role change or a deleted
 * account takes effect on the next request. A cookie issued under an older session version (the
 * user signed out, changed password or role, or signed out everywhere) is refused. 401 when signed out.
 *
 * When the organisation requires two-factor sign-in for staff, an organiser or guide who has not set
 * it up gets 403 `totp_setup_required` from every route except those that set it up
 * (`{ totpSetup: true }`: me, me/totp, signing out).
 */
export async function requireUser(event: H3Event, opts: { totpSetup?: boolean } = {}): Promise<User> {
  const session = await getUserSession(event)
  const id = (session.user as { id?: number } | undefined)?.id
  if (!id) throw createError({ statusCode: 401, statusMessage: 'Sign in first' })
  const user = await useDb().selectFrom('users').selectAll().where('id', '=', id).executeTakeFirst()
  const version = (session as { version?: number }).version
  if (!user || version !== user.session_version) {
    await clearUserSession(event)
    throw createError({ statusCode: 401, statusMessage: 'Sign in first', message: 'Your session has ended: sign in again' })
  }
  const renewedAt = Date.parse((session as { renewedAt?: string }).renewedAt ?? '')
  if (!(renewedAt > nowMs() - RENEW_AFTER_MS)) {
    await replaceUserSession(event, { ...session, renewedAt: nowIso() })
  }
  if (!opts.totpSetup && await totpSetupRequired(useDb(), user)) {
    throw createError({ statusCode: 403, statusMessage: 'Two-factor set-up required', message: 'Your organisation requires two-factor sign-in for staff: set it up on your account page first.', data: { code: 'totp_setup_required' } })
  }
  return user
}

/**
 * Ends every session of a user (this one included) by raising the session version, but only from
 * the version the caller's cookie carries: a cookie that has already ended (an older version, or
 * the user is gone) changes nothing, so it cannot end the sessions begun since. The check and the
 * raise are one conditional update, so two sign-outs at once raise it once.
 */
export async function endAllSessions(userId: number, fromVersion: number): Promise<boolean> {
  const r = await useDb().updateTable('users').set((eb) => ({ session_version: eb('session_version', '+', 1) }))
    .where('id', '=', userId).where('session_version', '=', fromVersion).executeTakeFirst()
  return !!r.numUpdatedRows
}

/** requireUser, then 403 unless the user's current role is one of `roles`. */
export async function requireRole(event: H3Event, ...roles: Role[]): Promise<User> {
  const user = await requireUser(event)
  if (!roles.includes(user.role)) throw createError({ statusCode: 403, statusMessage: 'Not allowed for your role' })
  return user
}

let proxies: { raw: string; list: TrustedProxies } | undefined
/** NUXT_TRUSTED_PROXIES, parsed once (and again only if it changes). */
function trustedProxies(): TrustedProxies {
  const raw = process.env.NUXT_TRUSTED_PROXIES ?? ''
  if (proxies?.raw !== raw) proxies = { raw, list: parseTrustedProxies(raw) }
  return proxies.list
}

/**
 * Whether the request came through a proxy we trust (NUXT_TRUSTED_PROXIES: comma-separated
 * addresses or CIDR ranges, e.g. "127.0.0.1, 10.0.0.0/8"): only then are X-Forwarded-For/-Proto/-Host believed.
 */
export function trustedProxy(event: H3Event): boolean {
  return trustedProxies().has(event.node.req.socket.remoteAddress ?? '')
}

/**
 * The client's address for throttles, sign-in backoff and the audit log: the right-most
 * X-Forwarded-For entry that is not a trusted proxy (see clientAddressFrom), an IPv6 address as its /64.
 */
export function clientIp(event: H3Event): string {
  const address = clientAddressFrom(event.node.req.socket.remoteAddress ?? 'unknown', getRequestHeader(event, 'x-forwarded-for'), trustedProxies())
  return throttleBucket(address)
}
