import { DecisionLockedError, DecisionRuleError, DecisionSupersededError } from '../services/decisions'
import { PushEndpointError } from '../services/decisionSend'

/** withServiceErrors, plus the decision service's own errors. */
export async function withDecisionErrors<T>(fn: () => Promise<T> | T): Promise<T> {
  try {
    return await withServiceErrors(fn)
  } catch (e) {
    if (e instanceof DecisionRuleError || e instanceof PushEndpointError) throw createError({ statusCode: 400, statusMessage: 'Invalid input', message: e.message, data: { fields: { [e.field]: e.message } } })
    if (e instanceof DecisionLockedError) throw createError({ statusCode: 409, statusMessage: 'Decision locked', message: e.message, data: { code: 'decision_locked', c1Utc: e.c1Utc } })
    if (e instanceof DecisionSupersededError) throw createError({ statusCode: 409, statusMessage: 'Decision replaced', message: e.message, data: { code: 'decision_superseded' } })
    throw e
  }
}
