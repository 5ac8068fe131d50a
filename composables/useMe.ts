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
