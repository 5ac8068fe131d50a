/**
 * The server and the shared zod schemas speak plain English ("Enter your password"). A message listed
 * here is shown in the page's language from the `messages` namespace of the locale files; any other
 * passes through unchanged. This list is the English text of that namespace, word for word
 * (tests/unit/i18n-keys.spec.ts checks both against each other and against the code that sends them);
 * it is kept in code because the i18n build compiles the locale files, so their text cannot be read back.
 */
export const MESSAGE_TEXTS: Readonly<Record<string, string>> = {
  emailInvalid: 'Enter a valid e-mail address',
  passwordMissing: 'Enter your password',
  passwordShort: 'Use at least 10 characters',
  nameMissing: 'Enter your name',
  nameControl: 'Name may not contain control characters (tabs, line breaks and the like)',
  currentPasswordMissing: 'Enter your current password',
  currentPasswordWrong: 'Current password is not right',
  passwordWrong: 'Password is not right',
  repeatMissing: 'Type the same password again',
  repeatDiffers: 'The two passwords differ',
  linkNoToken: 'The link has no token',
  linkDead: 'This link is not valid any more: ask for a new one',
  codeTooLong: 'That code is too long',
  codeSixDigits: 'Enter the 6-digit code from your app',
  codeOrRecovery: 'Enter the code from your app or a recovery code',
  codeWrong: 'That code is not right',
  codeWrongOrUsed: 'That code is not right, or it was already used.',
  codeNeeded: 'Enter the 6-digit code from your authenticator app, or a recovery code.',
  signInFailed: 'E-mail or password is not right',
  sessionEnded: 'Your session has ended: sign in again',
  linkTooSoon: 'A link was sent less than a minute ago: check your inbox',
  eraseTick: 'Tick the box to confirm that this cannot be undone',
  tryAgain: 'Something went wrong. Try again.',
}

const KEY_OF: ReadonlyMap<string, string> = new Map(Object.entries(MESSAGE_TEXTS).map(([key, text]) => [text, key]))

export function localMessage(text: string): string {
  const key = KEY_OF.get(text)
  const i18n = tryUseNuxtApp()?.$i18n
  if (!key || !i18n) return text
  return i18n.t(`messages.${key}`)
}

/**
 * A refusal the server explains by a code (sold out, a hold already open, too many requests…), in the
 * page's language from the `serverCodes` namespace, with the figures the answer carries. English pages
 * keep the server's own sentence; an unknown code gives undefined, and the caller shows the sentence.
 */
export function codeMessage(data: unknown): string | undefined {
  const d = data as { code?: unknown } | null | undefined
  const i18n = tryUseNuxtApp()?.$i18n
  if (!i18n || typeof d?.code !== 'string' || i18n.locale.value === 'en') return undefined
  const key = `serverCodes.${d.code}`
  return i18n.te(key) ? i18n.t(key, d as Record<string, unknown>) : undefined
}
