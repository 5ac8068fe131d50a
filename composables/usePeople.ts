import type { PublicUser } from '#shared/schemas/auth'

export function usePeople() {
  return useFetch<{ data: PublicUser[]; meta: { total: number } }>('/api/users', { key: 'people' })
}
