// Sign-up and sign-in bodies: the contract shared by the sign-in page and the auth routes.
import { z } from 'zod'
import { stripBidiControls } from './limits'

export const emailSchema = z.string().trim().toLowerCase()
  .pipe(z.email({ error: 'email must be a valid e-mail address, e.g. name@example.com' }))

export const signUpSchema = z.object({
  email: emailSchema,
  name: z.string({ error: 'name is required' }).overwrite(stripBidiControls).trim().min(1, { error: 'name must not be empty' }).max(120, { error: 'name must be at most 120 characters' }),
  password: z.string({ error: 'password is required' })
    .min(10, { error: 'password must be at least 10 characters' })
    .max(256, { error: 'password must be at most 256 characters' }),
})
export type SignUpInput = z.infer<typeof signUpSchema>

export const signInSchema = z.object({
  email: emailSchema,
  password: z.string({ error: 'password is required' }).min(1, { error: 'password is required' }).max(256, { error: 'password must be at most 256 characters' }),
})
export type SignInInput = z.infer<typeof signInSchema>

export const ROLE_NAMES = ['lead', 'designer', 'viewer'] as const
export type RoleName = (typeof ROLE_NAMES)[number]
