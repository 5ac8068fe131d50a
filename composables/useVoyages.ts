import type { Ref } from 'vue'

/** A workspace's voyages (response type inferred from the route). */
export function useWorkspaceVoyages(workspaceId: Ref<number>) {
  return useFetch(() => `/api/workspaces/${workspaceId.value}/voyages`, { key: computed(() => `voyages:${workspaceId.value}`) })
}

/** One voyage as planned, with its timetable. */
export function useVoyage(id: Ref<number>) {
  return useFetch(() => `/api/voyages/${id.value}`, { key: computed(() => `voyage:${id.value}`) })
}
