import en from '../i18n/locales/en/app.json'

/**
 * The server and the shared zod schemas speak plain English ("Enter your password"). A message that
 * the `messages` namespace of the locale files knows is shown in the page's language; any other
 * passes through unchanged. The English file is the index, so a message has exactly one key.
 */
const KEY_OF: ReadonlyMap<string, string> = new Map(Object.entries(en.messages).map(([key, text]) => [text, key]))

export function localMessage(text: string): string {
  const key = KEY_OF.get(text)
  const i18n = tryUseNuxtApp()?.$i18n
  if (!key || !i18n) return text
  return i18n.t(`messages.${key}`)
}
