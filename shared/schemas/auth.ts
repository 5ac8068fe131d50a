import { z } from 'zod'
import { PLAIN_TEXT, plainTextMessage } from './text'
import { LOCALE_CODES, type LocaleCode } from '../i18n/locales'

export const ROLE_VALUES = ['traveller', 'guide', 'organiser'] as const
export const RoleSchema = z.enum(ROLE_VALUES, { error: 'Choose traveller, guide or organiser' })
export type RoleName = z.infer<typeof RoleSchema>

const email = z.string({ error: 'Enter a valid e-mail address' }).trim().toLowerCase().email('Enter a valid e-mail address').max(254)

export const LoginBody = z.object({
  email,
  password: z.string({ error: 'Enter your password' }).min(1, 'Enter your password').max(200),
  /** The second step, for accounts with two-factor sign-in: a code from the app or a recovery code. */
  totp: z.string().trim().max(64, 'That code is too long').optional(),
})
export type LoginInput = z.infer<typeof LoginBody>

/** The one strength rule for a new password (sign-up, reset, invitation). */
const newPassword = z.string({ error: 'Use at least 10 characters' }).min(10, 'Use at least 10 characters').max(200)

/** The account's language: one of the supported codes (shared/i18n/locales.ts). */
export const LocaleSchema = z.enum(LOCALE_CODES, { error: `Choose one of the languages: ${LOCALE_CODES.join(', ')}` })

export const RegisterBody = z.object({
  name: z.string({ error: 'Enter your name' }).trim().min(1, 'Enter your name').max(120).regex(PLAIN_TEXT, plainTextMessage('name')),
  email,
  password: newPassword,
  /** The language the sign-up page was shown in; the account keeps it (English when absent). */
  locale: LocaleSchema.optional(),
})
export type RegisterInput = z.infer<typeof RegisterBody>

export const InviteBody = z.object({
  name: z.string({ error: 'Enter a name' }).trim().min(1, 'Enter a name').max(120).regex(PLAIN_TEXT, plainTextMessage('name')),
  email,
  role: z.enum(['guide', 'organiser'], { error: 'Choose guide or organiser' }),
})

export const RolePatch = z.object({ role: RoleSchema })

export const AccountPatch = z.object({
  name: z.string().trim().min(1, 'Enter your name').max(120).regex(PLAIN_TEXT, plainTextMessage('name')).optional(),
  currentPassword: z.string().max(200).optional(),
  newPassword: z.string().min(10, 'Use at least 10 characters').max(200).optional(),
  locale: LocaleSchema.optional(),
}).refine((v) => !v.newPassword || !!v.currentPassword, { message: 'Enter your current password', path: ['currentPassword'] })

export const IdParams = z.object({ id: z.coerce.number().int().positive() })

export const VerifyEmailBody = z.object({ token: z.string({ error: 'The link has no token' }).min(10, 'The link has no token').max(200) })

/** "Forgot your password": the address to send a link to. */
export const PasswordResetBody = z.object({ email })

/** A reset or invitation link's token and the new password (the sign-up rule). */
export const PasswordResetConfirmBody = z.object({
  token: z.string({ error: 'The link has no token' }).min(10, 'The link has no token').max(200),
  password: RegisterBody.shape.password,
})

/** The reset page's form: the new password twice (the token comes from the link). */
export const NewPasswordForm = z.object({
  password: RegisterBody.shape.password,
  repeat: z.string({ error: 'Type the same password again' }).min(1, 'Type the same password again'),
}).refine((v) => v.password === v.repeat, { message: 'The two passwords differ', path: ['repeat'] })

/** What a signed-in user may see of themselves and others. */
export interface PublicUser {
  id: number
  email: string
  name: string
  role: RoleName
  createdAt: string
  /** Whether the owner confirmed the address (needed to hold seats). */
  emailConfirmed: boolean
  /** The language the account reads Umbrafield and its e-mails in. */
  locale: LocaleCode
  /** Two-factor sign-in (GET /api/me only): on or off, and whether the organisation's rule still needs it set up. */
  twoFactor?: { enabled: boolean; setupRequired: boolean }
}

/** Permission rules shared by client (to hide buttons) and server (to decide). */
export const canManagePeople = (u: { role: RoleName } | null | undefined) => u?.role === 'organiser'
export const canPlan = (u: { role: RoleName } | null | undefined) => u?.role === 'organiser'
export const canViewPlans = (u: { role: RoleName } | null | undefined) => u?.role === 'organiser' || u?.role === 'guide'
