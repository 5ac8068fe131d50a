/** Sealing contexts of the day's-decision values (AES-256-GCM, server/services/sealed.ts). */
/** A recipient's acknowledgement token, kept until they acknowledge. */
export const ackContext = (recipientId: number) => `decision-ack:${recipientId}`
/** The sealing context of an SMS number or a queued message's token (bound to its own message id). */
export const smsContext = (messageId: string) => `decision-sms:${messageId}`
export const messageSecretContext = (messageId: string) => `decision-message:${messageId}`
/** The web-push VAPID private key in app_settings. */
export const VAPID_SETTING = 'web_push_vapid'
export const vapidContext = 'web-push:vapid'
