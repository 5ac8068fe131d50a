import { EclipseIdParams, EclipseSettingsPatch } from '#shared/schemas/elements'
import { setDeltaTOverride } from '../../../services/eclipses'

/** Organiser sets (or clears, with null) the ΔT used for this eclipse. */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser')
  const { id } = paramsAs(event, EclipseIdParams)
  const { deltaTSec } = await readBodyAs(event, EclipseSettingsPatch)
  await withServiceErrors(() => setDeltaTOverride(useDb(), user, id, deltaTSec))
  return { ok: true, deltaTSec }
})
