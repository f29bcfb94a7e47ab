import { z } from 'zod'
import { emailField, isoDate, optionalText } from './common'

export const passwordField = z.string().min(10, 'At least 10 characters').max(200, 'At most 200 characters')

export const LoginSchema = z.object({
  email: emailField,
  password: z.string().min(1, 'Enter your password').max(200, 'At most 200 characters'),
})
export type Login = z.infer<typeof LoginSchema>

/** Sign-up: an account and a pending membership. Under-18s name a guardian who must consent. */
export const SignupSchema = z.object({
  name: z.string().trim().min(1, 'Enter your name').max(120, 'At most 120 characters'),
  email: emailField,
  password: passwordField,
  birthDate: isoDate,
  guardianName: optionalText(120),
  guardianEmail: z.union([emailField, z.literal('')]).transform(v => (v === '' ? null : v)).nullable().optional(),
})
export type Signup = z.infer<typeof SignupSchema>

export const TokenSchema = z.object({ token: z.string().regex(/^[A-Za-z0-9_-]{20,100}$/, 'This link is not valid') })
export type TokenBody = z.infer<typeof TokenSchema>

export const ResetRequestSchema = z.object({ email: emailField })
export type ResetRequest = z.infer<typeof ResetRequestSchema>

export const ResetPasswordSchema = TokenSchema.extend({ password: passwordField })
export type ResetPassword = z.infer<typeof ResetPasswordSchema>
