import { tokenParamSchema } from '#shared/types/account'

/** What an invitation link offers (public: the token is the credential). */
export default defineEventHandler(async (event) => {
  const { token } = paramsAs(event, tokenParamSchema)
  const inv = await findPendingInvitation(useDB(), token)
  if (!inv) throw linkGone('invitation')
  return { email: inv.email, role: inv.role, expiresAt: inv.expiresAt }
})
