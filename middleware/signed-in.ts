import type { RoleName } from '#shared/schemas/auth'

declare module '#app' {
  interface PageMeta { roles?: RoleName[] }
}

/** Sends signed-out visitors to sign-in (coming back afterwards) and hides pages a role cannot use. Display only: the server decides. */
export default defineNuxtRouteMiddleware(async (to) => {
  const { data: me, refresh } = useMe()
  if (!me.value) await refresh()
  if (!me.value) return navigateTo({ path: '/login', query: { next: to.fullPath } })
  const setup = twoFactorSetupRoute(me.value, to.path)
  if (setup) return navigateTo(setup)
  const roles = to.meta.roles
  if (roles && !roles.includes(me.value.role)) {
    return abortNavigation(createError({ statusCode: 403, statusMessage: 'This page is not available for your role' }))
  }
})
