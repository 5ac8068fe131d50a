import type { PublicUser } from '#shared/schemas/auth'

export function usePeople() {
  return useFetch<{ data: Array<PublicUser & { locale?: string }>; meta: { total: number } }>('/api/users', { key: 'people' })
}
