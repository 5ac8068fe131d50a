import type { PublicUser } from '#shared/schemas/auth'

/**
 * Staff whom the organisation's two-factor rule still needs to set it up go to the account page's
 * set-up, from any page. Display only: the server answers 403 totp_setup_required meanwhile.
 */
export default defineNuxtRouteMiddleware(async (to) => {
  let me = useNuxtData<PublicUser | null>('me').data.value
  // On the server's first render the account is not loaded yet: load it only when there is a session
  // cookie, so signed-out visitors cost no request.
  if (!me && import.meta.server && useCookie('nuxt-session').value) me = (await useMe()).data.value
  const setup = twoFactorSetupRoute(me, to.path)
  if (setup) return navigateTo(setup)
})
