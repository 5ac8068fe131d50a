import { CatalogueQuery } from '#shared/schemas/elements'
import { listEclipses } from '../../services/eclipses'

export default defineEventHandler((event) => {
  const q = queryAs(event, CatalogueQuery)
  const data = listEclipses(q)
  return { data, meta: { total: data.length, source: 'computed from astronomy-engine ephemerides; dates from its eclipse search' } }
})
