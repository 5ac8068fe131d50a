import type { CatalogueRow } from '#shared/eclipse/types'
import type { Ref } from 'vue'
import type { TimeBasisOut } from '~~/server/eclipse/report'

/** A catalogue row, as the server sends it. */
export type EclipseRow = CatalogueRow

export function useEclipses(filters: Ref<{ from?: number; to?: number; type?: string; upcoming?: string }>) {
  return useFetch<{ data: EclipseRow[]; meta: { total: number } }>('/api/eclipses', {
    key: computed(() => `eclipses:${JSON.stringify(filters.value)}`),
    query: filters,
  })
}

export function useEclipse(id: Ref<string> | string) {
  const idRef = toRef(id)
  return useFetch<EclipseRow & {
    deltaT: { sec: number; sigmaSec: number; basis: string; override: number | null }
    time: TimeBasisOut
    elements: { source: string; kind: 'computed' | 'published'; date: string; t0Tdt: number }
  }>(() => `/api/eclipses/${idRef.value}`, { key: computed(() => `eclipse:${idRef.value}`) })
}

export function formatDuration(sec: number | null | undefined): string {
  if (sec === null || sec === undefined) return '—'
  const m = Math.floor(sec / 60)
  const s = sec - m * 60
  return `${m}m ${s.toFixed(1).padStart(4, '0')}s`
}
