import type { Ref } from 'vue'
import type { BesselianElements } from '#shared/eclipse/types'

export interface TimetableContact { utc: string; local: string; utcOffset: string; altitudeDeg: number; azimuthDeg: number; uncertaintySec: number; belowHorizon: boolean; positionAngleDeg?: number; vertexAngleDeg?: number; direction?: string }
export interface TimetableCue { key: string; anchor: string; offsetSec: number; label: string; filters: 'on' | 'off' | 'unchanged'; utc: string; local: string; utcOffset: string; zone: string }
export interface TimetableSite {
  siteId: number; name: string; role: string; lat: number; lon: number; elevationM: number; zone: string; utcOffset: string
  type: string; durationSec: number; magnitude: number; obscuration: number
  contacts: Partial<Record<'c1' | 'c2' | 'max' | 'c3' | 'c4', TimetableContact>>
  cues: TimetableCue[]; planets: Array<{ name: string; altitudeDeg: number; azimuthDeg: number }>; deltaTSec: number; elementsSource: string; uncertaintyMethod: string
}
export interface Timetable {
  trip: { id: number; title: string; eclipseId: string; meetingPoint: { name: string; timeUtc: string } }
  sites: TimetableSite[]; safety: string[]; elements: BesselianElements; deltaTSec: number; generatedAt: string
}

export function useTimetable(tripId: Ref<number>) {
  return useFetch<Timetable>(() => `/api/trips/${tripId.value}/timetable`, { key: computed(() => `timetable:${tripId.value}`) })
}
