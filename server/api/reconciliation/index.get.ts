import { reconciliationReport } from '../../services/money'

/** Organisers: the last reconciliation's differences and the refunds that keep failing. */
export default defineEventHandler(async (event) => {
  await requireRole(event, 'organiser')
  return reconciliationReport(useDb())
})
