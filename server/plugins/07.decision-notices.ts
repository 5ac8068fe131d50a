import { processNotices, smsConfigFromEnv, twilioSender, vapidKeys, webPushSender } from '../services/decisionSend'

/**
 * Sends the SMS and push side of decision notices every few seconds (e-mail goes through the mail
 * worker). Without SMS settings, text messages wait in the queue; pushes always go (the VAPID keys
 * are made on first start and kept in the database).
 */
export default defineNitroPlugin((nitro) => {
  const sms = smsConfigFromEnv()
  if (!sms) console.warn('[umbrafield] NUXT_SMS_ACCOUNT_SID / _AUTH_TOKEN / NUXT_SMS_FROM are not set: text messages stay queued until they are.')
  const smsSender = sms ? twilioSender(sms) : null
  let push: ReturnType<typeof webPushSender> | null = null
  let running = false
  const tick = async () => {
    if (running) return
    running = true
    try {
      await dbReady()
      if (!push) {
        const from = /<([^>]+)>/.exec(useRuntimeConfig().mail.from)?.[1] ?? 'trips@umbrafield.test'
        push = webPushSender(await vapidKeys(useDb()), `mailto:${from}`)
      }
      await processNotices(useDb(), { sms: smsSender, push })
    } catch (e) {
      console.error('[umbrafield] decision notices:', (e as Error).message)
    } finally { running = false }
  }
  const timer = setInterval(tick, Number(process.env.UMBRAFIELD_NOTICE_POLL_MS || process.env.UMBRAFIELD_MAIL_POLL_MS || 2000))
  timer.unref()
  nitro.hooks.hook('close', () => clearInterval(timer))
})
