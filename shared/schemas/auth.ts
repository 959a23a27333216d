import { z } from 'zod'
import { email, password } from './common'

export const loginBody = z.strictObject({
  email,
  password: z.string().min(1, 'Required').max(200),
})
export type LoginBody = z.infer<typeof loginBody>

export const forgotBody = z.strictObject({ email })
export type ForgotBody = z.infer<typeof forgotBody>

export const resetBody = z.strictObject({
  token: z.string().min(10).max(2000),
  password,
})
export type ResetBody = z.infer<typeof resetBody>

export const tokenQuery = z.object({ token: z.string().min(10).max(2000) })
