import type { H3Event } from 'h3'
import type { Role, User } from '../database/schema'
import type { PublicUser } from '#shared/schemas/auth'

export function toPublicUser(u: User): PublicUser {
  return { id: u.id, email: u.email, name: u.name, role: u.role, createdAt: u.created_at, emailConfirmed: !!u.email_confirmed_at }
}

/**
 * The signed-in user, read from the database on every call, so a role change or a deleted
 * account takes effect on the next request. 401 when signed out.
 */
export async function requireUser(event: H3Event): Promise<User> {
  const session = await getUserSession(event)
  const id = (session.user as { id?: number } | undefined)?.id
  if (!id) throw createError({ statusCode: 401, statusMessage: 'Sign in first' })
  const user = await useDb().selectFrom('users').selectAll().where('id', '=', id).executeTakeFirst()
  if (!user) {
    await clearUserSession(event)
    throw createError({ statusCode: 401, statusMessage: 'Sign in first' })
  }
  return user
}

/** requireUser, then 403 unless the user's current role is one of `roles`. */
export async function requireRole(event: H3Event, ...roles: Role[]): Promise<User> {
  const user = await requireUser(event)
  if (!roles.includes(user.role)) throw createError({ statusCode: 403, statusMessage: 'Not allowed for your role' })
  return user
}

export function clientIp(event: H3Event): string {
  return getRequestIP(event, { xForwardedFor: false }) ?? 'unknown'
}
