import type { Ref } from 'vue'
import type { SiteOut } from '#shared/schemas/sites'

export interface WorkspaceView { id: number; eclipseId: string; name: string; createdAt?: string; climatologyId?: number | null }

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
