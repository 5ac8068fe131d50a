import type { PublicUser } from '#shared/schemas/auth'

/**
 * Staff whom the organisation's two-factor rule still needs to set it up go to the account page's
 * set-up, from any page, once their account is known (signed-in pages load it themselves). Display
 * only: the server answers 403 totp_setup_required meanwhile.
 */
export default defineNuxtRouteMiddleware((to) => {
  // Reads what is already loaded; fetches nothing, so signed-out visitors cost no request.
  const { data: me } = useNuxtData<PublicUser | null>('me')
  const setup = twoFactorSetupRoute(me.value, to.path)
  if (setup) return navigateTo(setup)
})
