import { tokenParamSchema } from '#shared/types/account'

/** Whether a reset link is still usable (public: the token is the credential). */
export default defineEventHandler(async (event) => {
  const { token } = paramsAs(event, tokenParamSchema)
  const row = await findPendingReset(useDB(), token)
  if (!row) throw linkGone('password-reset')
  return { ok: true, expiresAt: row.expiresAt }
})
