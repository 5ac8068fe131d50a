/**
 * A site's height when nobody has set one. Contacts are computed at sea level then: 1 km of height
 * moves the observer by up to about 1 km on the fundamental plane, which the shadow crosses in one or
 * two seconds, so the assumption matters little for timing but is said wherever a timetable shows.
 */
export const ASSUMED_HEIGHT_M = 0

export const HEIGHT_NOT_SET_NOTE = 'Height not set: the contacts are computed at sea level (0 m). Fill it in from the workspace\'s terrain model or by hand.'

/** "120 m", or "not set". */
export function heightLabel(elevationM: number | null | undefined): string {
  return elevationM === null || elevationM === undefined ? 'not set' : `${Math.round(elevationM)} m`
}
