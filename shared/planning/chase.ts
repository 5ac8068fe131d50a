/** Expected seconds within this many of each other count as equal, and the shorter trip wins. */
export const CHASE_STEP_SEC = 10

export interface ChaseCandidate {
  /** Expected seen seconds (duration × P(clear)), or null without cloud figures. */
  expectedSec: number | null
  durationSec: number
  /** Distance from the primary site, km. */
  distanceKm: number
}

/** What a fallback is worth: expected seen seconds, or the duration alone without cloud figures. */
export const chaseScore = (c: ChaseCandidate) => c.expectedSec ?? c.durationSec

/**
 * Ranks fallback sites for a chase: the most expected seen seconds first, counted in steps of
 * CHASE_STEP_SEC, so that sites about as good are ordered by the shorter trip from the primary.
 * Sites with no central phase go last.
 */
export function chaseOrder<T extends ChaseCandidate>(candidates: T[]): T[] {
  return [...candidates].sort((a, b) =>
    Number(b.durationSec > 0) - Number(a.durationSec > 0)
    || Math.floor(chaseScore(b) / CHASE_STEP_SEC) - Math.floor(chaseScore(a) / CHASE_STEP_SEC)
    || a.distanceKm - b.distanceKm
    || chaseScore(b) - chaseScore(a))
}
