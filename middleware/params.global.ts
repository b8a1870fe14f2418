// Record pages are addressed by positive whole-number ids (/lobes/3, /studies/12, /objects/7/edit).
// Anything else (/studies/abc, /objects/0) is an address that cannot exist: answer with the
// not-found page here, once for every such page, instead of letting each page fetch with a bad id.
const ID = /^[1-9]\d{0,15}$/

export default defineNuxtRouteMiddleware((to) => {
  const id = to.params.id
  if (id === undefined) return
  if (typeof id !== 'string' || !ID.test(id)) {
    return abortNavigation(createError({ status: 404, statusText: 'Not found', data: { path: to.path } }))
  }
})
