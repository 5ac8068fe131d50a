import { IdParams } from '#shared/schemas/auth'
import { decisionBoard } from '../../../services/decisions'

/** The decision in force, its history, and per person what reached them and when they acknowledged: organisers and the trip's guides. */
export default defineEventHandler(async (event) => {
  const user = await requireRole(event, 'organiser', 'guide')
  const { id } = paramsAs(event, IdParams)
  return withDecisionErrors(() => decisionBoard(useDb(), user, id))
})
