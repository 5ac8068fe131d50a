import type { PublicUser } from '#shared/schemas/auth'

/**
 * The signed-in user as the server sees it now (role read from the database), or null.
 * Used for display only; every privileged route checks the role again on the server.
 */
export function useMe() {
  const requestFetch = useRequestFetch()
  return useAsyncData<PublicUser | null>('me', () => requestFetch<PublicUser>('/api/me').catch(() => null), {
    default: () => null,
  })
}

/** A local path to go to after sign-in: must start with "/" and not "//" (no open redirects). */
export function safeNext(next: unknown): string {
  return typeof next === 'string' && next.startsWith('/') && !next.startsWith('//') && !next.startsWith('/\\') ? next : '/'
}

/** Where staff go while the organisation's two-factor rule still needs them to set it up (null: nowhere). */
export function twoFactorSetupRoute(me: PublicUser | null | undefined, path: string) {
  if (!me?.twoFactor?.setupRequired || path === '/account') return null
  return { path: '/account', query: { setup: 'two-factor' }, hash: '#two-factor' }
}
