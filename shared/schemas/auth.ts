import { z } from 'zod'
import { email } from './common'
import { passwordProblems } from '../passwordRule'
// Brings the zxcvbn word lists: of the client, only the pages where a password is chosen import
// the schemas of this module at run time (the sign-in page uses its types alone).
import { estimateStrength } from '../passwordStrength'

/** A password typed to prove who one is: any length the form takes, checked against the hash. */
const typedPassword = z.string().min(1, 'Required').max(200)

export const loginBody = z.strictObject({ email, password: typedPassword })
export type LoginBody = z.infer<typeof loginBody>

export const forgotBody = z.strictObject({ email })
export type ForgotBody = z.infer<typeof forgotBody>

/**
 * A new password under the password rule (shared/passwordRule.ts). The rule's part about the
 * owner's name and address needs the account, so the services check it again with the owner.
 */
export const newPassword = z.string().superRefine((value, ctx) => {
  for (const message of passwordProblems(value, estimateStrength))
    ctx.addIssue({ code: 'custom', message })
})

export const resetBody = z.strictObject({
  token: z.string().min(10).max(2000),
  password: newPassword,
})
export type ResetBody = z.infer<typeof resetBody>

/** The token of a set-password link, sent in the body so it never lands in a log line. */
export const linkBody = z.strictObject({ token: z.string().min(10).max(2000) })
export type LinkBody = z.infer<typeof linkBody>

export const changePasswordBody = z.strictObject({
  currentPassword: typedPassword,
  newPassword,
})
export type ChangePasswordBody = z.infer<typeof changePasswordBody>
