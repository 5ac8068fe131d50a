import { myGuidedTrips } from '../../services/tripOps'

/** "My trips": a guide's assigned trips (an organiser's: all), with their sites for the guide's tools. */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'guide', 'organiser')
  return myGuidedTrips(useDb(), user)
})
