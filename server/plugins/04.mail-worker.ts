import { queueBalanceReminders } from '../services/bookingMail'
import { makeTransport, processOutbox } from '../services/outbox'
import { nowMs } from '../services/clock'

/** Sends the outbox every few seconds, and once an hour queues balance reminders. No SMTP configured: mail waits. */
export default defineNitroPlugin((nitro) => {
  const c = useRuntimeConfig().mail
  if (!c.smtpHost) {
    console.warn('[umbrafield] NUXT_MAIL_SMTP_HOST is not set: e-mail stays in the outbox until it is.')
    return
  }
  const transport = makeTransport({ host: c.smtpHost, port: Number(c.smtpPort) || 25, secure: c.smtpSecure === 'true', user: c.smtpUser, pass: c.smtpPass, from: c.from })
  let running = false
  let lastReminders = 0
  const tick = async () => {
    if (running) return
    running = true
    try {
      await dbReady()
      if (nowMs() - lastReminders > 3600_000) { lastReminders = nowMs(); await queueBalanceReminders(useDb(), useRuntimeConfig().public.appUrl) }
      await processOutbox(useDb(), transport, c.from)
    } catch (e) {
      console.error('[umbrafield] mail worker:', (e as Error).message)
    } finally { running = false }
  }
  const timer = setInterval(tick, Number(process.env.UMBRAFIELD_MAIL_POLL_MS || 2000))
  timer.unref()
  nitro.hooks.hook('close', () => { clearInterval(timer); transport.close() })
})
