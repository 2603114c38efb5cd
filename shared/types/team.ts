// Team workflow contracts: invitations, password reset, API tokens.
import { z } from 'zod'
import { stripBidiControls } from './limits'
import { emailSchema, signUpSchema, ROLE_NAMES } from './account'


export const invitationCreateSchema = z.object({
  email: emailSchema,
  role: z.enum(ROLE_NAMES, { error: 'role must be one of lead, designer, viewer' }),
})

/** A member in the address: /api/teams/:id/members/:userId (user ids are lucia's text ids). */
export const memberParamSchema = z.object({
  id: z.uuid({ error: 'team id in the address must be a UUID' }),
  userId: z.string().regex(/^[A-Za-z0-9_-]{1,64}$/, { error: 'userId in the address is not a Lensfield user id' }),
})

export const memberRoleSchema = z.object({
  role: z.enum(ROLE_NAMES, { error: 'role must be one of lead, designer, viewer' }),
})

/** Link secrets are 43 base64url characters (32 random bytes). */
export const linkTokenSchema = z.string({ error: 'token is required' }).regex(/^[A-Za-z0-9_-]{20,100}$/, { error: 'token is not a Lensfield link token: open the link from the mail again' })

export const invitationAcceptSchema = z.object({
  token: linkTokenSchema,
  /** Needed only when no account with the invited e-mail exists yet. */
  name: signUpSchema.shape.name.optional(),
  password: signUpSchema.shape.password.optional(),
})

export const passwordResetRequestSchema = z.object({ email: emailSchema })
export const passwordResetConfirmSchema = z.object({ token: linkTokenSchema, password: signUpSchema.shape.password })

export const apiTokenCreateSchema = z.object({
  name: z.string({ error: 'name is required' }).overwrite(stripBidiControls).trim().min(1, { error: 'name must not be empty' }).max(80, { error: 'name must be at most 80 characters' }),
})
