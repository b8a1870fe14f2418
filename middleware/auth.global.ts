// Pages are for members, except the sign-in, invitation and password-reset pages.
const PUBLIC = [/^\/sign-in$/, /^\/join\//, /^\/reset(\/|$)/, /^\/forgot-password$/]

export default defineNuxtRouteMiddleware((to) => {
  if (PUBLIC.some(p => p.test(to.path))) return
  const session = useSessionStore()
  if (!session.signedIn) return navigateTo({ path: '/sign-in', query: to.fullPath !== '/' ? { next: to.fullPath } : {} })
  const need = to.meta.role as import('#shared/types/roles').Role | undefined
  if (need && !session.can(need)) return abortNavigation(createError({ status: 403, statusText: `This page needs the ${need} role`, data: { path: to.path } }))
})
