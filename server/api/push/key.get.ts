import { vapidKeys } from '../../services/decisionSend'

/** The VAPID public key a browser subscribes with (anyone signed in). */
export default defineEventHandler(async (event) => {
  await requireUser(event)
  return { publicKey: (await vapidKeys(useDb())).publicKey }
})
