import type { Ref } from 'vue'
import type { decisionBoard } from '~~/server/services/decisions'

/** The decision board, as GET /api/trips/{id}/decision returns it (types from the service). */
export type DecisionBoard = Awaited<ReturnType<typeof decisionBoard>>
export type DecisionRecipient = DecisionBoard['recipients'][number]

export function useDecision(tripId: Ref<number>) {
  return useFetch<DecisionBoard>(() => `/api/trips/${tripId.value}/decision`, { key: computed(() => `decision:${tripId.value}`) })
}
