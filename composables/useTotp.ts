import type { SecuritySettings, TotpStatus } from '#shared/schemas/totp'

/** The caller's two-factor state (GET /api/me/totp). */
export function useTotpStatus() {
  const requestFetch = useRequestFetch()
  return useAsyncData<TotpStatus | null>('me-totp', () => requestFetch<TotpStatus>('/api/me/totp').catch(() => null), { default: () => null })
}

/** App-wide security settings (organisers). */
export function useSecuritySettings() {
  return useFetch<SecuritySettings>('/api/settings/security', { key: 'security-settings' })
}
