export { canPlan, canManagePeople, canViewPlans } from '#shared/schemas/auth'
export { formatMoney as formatMoneyFor } from '#shared/schemas/trips'

/** "02 Aug 2027, 13:02:05" style local wall-clock text for an ISO-ish "YYYY-MM-DD HH:MM:SS". */
export function shortLocal(local: string): string {
  return local.slice(11)
}
