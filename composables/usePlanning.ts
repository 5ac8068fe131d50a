import type { Ref } from 'vue'
import type { SiteOut } from '#shared/schemas/sites'

export interface WorkspaceView {
  id: number; eclipseId: string; name: string; createdAt?: string; climatologyId?: number | null
  /** Whether the chosen climatology covers the eclipse month and the workspace's ground: one warning naming what is missing. */
  coverage?: { month: number; monthName: string; missing: 'month' | 'region' | null; warning: string | null }
}

export function useWorkspaces() {
  return useFetch<{ data: WorkspaceView[] }>('/api/workspaces', { key: 'workspaces' })
}

export function useWorkspace(id: Ref<number>) {
  return useFetch<WorkspaceView>(() => `/api/workspaces/${id.value}`, { key: computed(() => `workspace:${id.value}`) })
}

export function useWorkspaceSites(id: Ref<number>) {
  return useFetch<{ data: SiteOut[] }>(() => `/api/workspaces/${id.value}/sites`, { key: computed(() => `sites:${id.value}`) })
}

/** The eclipse path with continuous longitudes, for drawing. */
export function useEclipsePath(eclipseId: Ref<string | undefined>) {
  return useFetch<GeoJSON.FeatureCollection>(() => `/api/eclipses/${eclipseId.value}/path`, {
    key: computed(() => `path:${eclipseId.value}`),
    query: { wrap: 'unwrap', step: 300 },
    immediate: !!eclipseId.value,
    server: false,
  })
}

export interface ClimatologyView {
  id: number; name: string; source: string; licence: string; years: string; timeOfDay: string; demo: boolean
  format: string; resolutionDeg: { lat: number; lon: number }; hasCategories: boolean; months: number[]
}
export interface CloudLayerView {
  none?: boolean; month: number; name: string; source: string; demo: boolean; note?: string
  cells: GeoJSON.FeatureCollection; profile: Array<{ utc: string; lat: number; lon: number; cloudPct: number | null; pClear: number | null }>
  legend: Array<[number, string]>
}

export function useClimatologies() {
  return useFetch<{ data: ClimatologyView[] }>('/api/climatology', { key: 'climatologies' })
}

export function useCloudLayer(workspaceId: Ref<number>) {
  return useFetch<CloudLayerView>(() => `/api/workspaces/${workspaceId.value}/cloud-layer`, { key: computed(() => `cloud-layer:${workspaceId.value}`), server: false })
}
