import type { Ref } from 'vue'
import type { Timetable as ServerTimetable } from '~~/server/services/timetable'

/** The trip timetable as GET /api/trips/{id}/timetable returns it (types from the service itself). */
export type Timetable = ServerTimetable
export type TimetableSite = Timetable['sites'][number]
export type TimetableCue = TimetableSite['cues'][number]

export function useTimetable(tripId: Ref<number>) {
  return useFetch<Timetable>(() => `/api/trips/${tripId.value}/timetable`, { key: computed(() => `timetable:${tripId.value}`) })
}
