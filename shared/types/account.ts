import { z } from 'zod'
import { ROLES } from '#shared/types/roles'

/** One schema per form, used by the page and by the handler. */
export const emailSchema = z.string().trim().toLowerCase().email('Enter a valid e-mail address').max(254)
export const passwordSchema = z.string().min(10, 'Use at least 10 characters').max(200, 'Use at most 200 characters')
export const displayNameSchema = z.string().trim().min(1, 'Enter a name').max(120, 'Use at most 120 characters')
export const roleSchema = z.enum(ROLES)

export const signInSchema = z.object({ email: emailSchema, password: z.string().min(1, 'Enter your password').max(200) })
export const accountUpdateSchema = z.object({ name: displayNameSchema })
export const passwordChangeSchema = z.object({ currentPassword: z.string().min(1, 'Enter your current password'), newPassword: passwordSchema })
export const invitationSchema = z.object({ email: emailSchema, role: roleSchema })
export const acceptInvitationSchema = z.object({ name: displayNameSchema, password: passwordSchema })
export const resetRequestSchema = z.object({ email: emailSchema })
export const resetCompleteSchema = z.object({ password: passwordSchema })
export const memberUpdateSchema = z.object({ role: roleSchema.optional(), active: z.boolean().optional() })
  .refine(v => v.role !== undefined || v.active !== undefined, 'Give a role or an active flag')
export const apiTokenCreateSchema = z.object({ label: z.string().trim().min(1, 'Name the token').max(80) })

export const idParamSchema = z.object({ id: z.coerce.number().int().positive() })
export const tokenParamSchema = z.object({ token: z.string().min(20).max(200) })
