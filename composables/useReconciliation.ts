/** The last money check (organisers): differences between ledgers and Stripe, and refunds that keep failing. */
export function useReconciliation() {
  return useFetch('/api/reconciliation', { key: 'reconciliation' })
}
