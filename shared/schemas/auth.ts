import { z } from 'zod'
import { isJunior } from '../utils/membership-status'
import { emailField, isoDate, nameField, optionalName } from './common'

/** The shortest new password (sign-up, reset, admin accounts); sign-in does not apply it. */
export const MIN_PASSWORD_LENGTH = 12

/**
 * A new password: 12 to 200 characters. The server adds the common-password check
 * (server/services/accounts/passwords.ts), whose list is too large for the browser bundle.
 */
export const passwordField = z.string()
  .min(MIN_PASSWORD_LENGTH, `At least ${MIN_PASSWORD_LENGTH} characters`)
  .max(200, 'At most 200 characters')

export const LoginSchema = z.object({
  email: emailField,
  password: z.string().min(1, 'Enter your password').max(200, 'At most 200 characters'),
})
export type Login = z.infer<typeof LoginSchema>

/** The earliest birth date sign-up accepts (anything earlier is a typing slip). */
export const EARLIEST_BIRTH_DATE = '1900-01-01'

/** Sign-up: an account and a pending membership. Under-18s name a guardian who must consent. */
export const SignupSchema = z.object({
  name: nameField(),
  email: emailField,
  password: passwordField,
  birthDate: isoDate,
  guardianName: optionalName(),
  guardianEmail: z.union([emailField, z.literal('')]).transform(v => (v === '' ? null : v)).nullable().optional(),
})
export type Signup = z.infer<typeof SignupSchema>

/**
 * SignupSchema plus the rules that depend on the date: the birth date lies between 1900 and `today`,
 * and a junior (under 18 on `today`, the club's calendar date) names a guardian with an e-mail of
 * their own. The server passes today in the club's time zone; the form passes the browser's date.
 * The server also passes its stricter `password` field (with the common-password check).
 */
export function signupSchemaFor(today: string, password: z.ZodType<string> = passwordField) {
  return SignupSchema.extend({ password }).superRefine((v, ctx) => {
    // zod runs refinements on data whose fields already failed; a malformed date has its message.
    if (!isoDate.safeParse(v.birthDate).success) return
    if (v.birthDate > today) {
      ctx.addIssue({ code: 'custom', path: ['birthDate'], message: 'The birth date cannot be in the future' })
      return
    }
    if (v.birthDate < EARLIEST_BIRTH_DATE) {
      ctx.addIssue({ code: 'custom', path: ['birthDate'], message: 'Check the year of the birth date' })
      return
    }
    if (!isJunior(v.birthDate, today)) return
    if (!v.guardianName) {
      ctx.addIssue({ code: 'custom', path: ['guardianName'], message: 'Members under 18 name a parent or guardian' })
    }
    if (!v.guardianEmail) {
      ctx.addIssue({ code: 'custom', path: ['guardianEmail'], message: 'Enter the guardian\'s e-mail: we ask them for consent' })
    }
    else if (v.guardianEmail === v.email) {
      ctx.addIssue({ code: 'custom', path: ['guardianEmail'], message: 'Use the guardian\'s own e-mail, not yours' })
    }
  })
}

export const TokenSchema = z.object({ token: z.string().regex(/^[A-Za-z0-9_-]{20,100}$/, 'This link is not valid') })
export type TokenBody = z.infer<typeof TokenSchema>

export const ResetRequestSchema = z.object({ email: emailField })
export type ResetRequest = z.infer<typeof ResetRequestSchema>

export const ResetPasswordSchema = TokenSchema.extend({ password: passwordField })
export type ResetPassword = z.infer<typeof ResetPasswordSchema>

/** The reset form: the new password typed twice (the route takes ResetPasswordSchema). */
export const NewPasswordFormSchema = z.object({
  password: passwordField,
  confirm: z.string().max(200, 'At most 200 characters'),
}).refine(v => v.password === v.confirm, { path: ['confirm'], message: 'The two passwords differ' })
export type NewPasswordForm = z.infer<typeof NewPasswordFormSchema>

/** "Sign out everywhere else": the caller confirms it, so an empty or stray request ends nothing. */
export const SignOutOthersSchema = z.object({ confirm: z.literal(true, { errorMap: () => ({ message: 'Confirm to sign out your other sessions' }) }) })
export type SignOutOthers = z.infer<typeof SignOutOthersSchema>
