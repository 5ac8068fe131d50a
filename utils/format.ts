export { canPlan, canManagePeople, canViewPlans } from '#shared/schemas/auth'
export { formatMoney as formatMoneyFor } from '#shared/schemas/trips'
