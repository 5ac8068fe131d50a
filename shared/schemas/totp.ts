import { z } from 'zod'

/** A 6-digit code from the authenticator app (spaces allowed, as apps show "123 456"). */
const code = z.string({ error: 'Enter the 6-digit code from your app' }).transform((s) => s.replace(/\s+/g, ''))
  .pipe(z.string().regex(/^\d{6}$/, 'Enter the 6-digit code from your app'))

export const TotpConfirmBody = z.object({ code })
export type TotpConfirmInput = z.input<typeof TotpConfirmBody>

/** A code from the app or a recovery code (either form; the server tells which). */
export const SecondFactor = z.string({ error: 'Enter the code from your app or a recovery code' }).trim()
  .min(1, 'Enter the code from your app or a recovery code').max(64, 'That code is too long')

export const TotpDisableBody = z.object({
  password: z.string({ error: 'Enter your password' }).min(1, 'Enter your password').max(200),
  totp: SecondFactor,
})
export type TotpDisableInput = z.input<typeof TotpDisableBody>

export const SecuritySettingsPatch = z.object({
  requireStaffTotp: z.boolean({ error: 'Say true or false' }),
})

/** App-wide security settings, as organisers see them. */
export interface SecuritySettings {
  /** Organisers and guides must use two-factor sign-in before any staff route answers. */
  requireStaffTotp: boolean
}

/** The caller's two-factor state (GET /api/me/totp). */
export interface TotpStatus {
  enabled: boolean
  /** Set-up was started (a secret offered) but not yet confirmed with a code. */
  pending: boolean
  enabledAt: string | null
  recoveryCodesLeft: number
  /** The organisation requires two-factor for staff, and the caller is staff. */
  requiredByPolicy: boolean
  /** Required by policy but not yet set up: staff routes answer 403 totp_setup_required until it is. */
  setupRequired: boolean
}

/** What POST /api/me/totp returns: the secret to enter by hand, the otpauth URI, and a QR code of it (SVG). */
export interface TotpSetup {
  secret: string
  otpauthUrl: string
  qrSvg: string
}
