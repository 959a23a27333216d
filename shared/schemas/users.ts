import { z } from 'zod'
import { STAFF_ROLES, USER_STATUSES } from '../constants'
import { email, personName } from './common'

export const inviteUserBody = z.strictObject({
  email,
  name: personName,
  role: z.enum(STAFF_ROLES, 'Choose admin, developer or analyst'),
})
export type InviteUserBody = z.infer<typeof inviteUserBody>

export const updateUserBody = z
  .strictObject({
    name: personName.optional(),
    role: z.enum(STAFF_ROLES, 'Choose admin, developer or analyst').optional(),
    status: z.enum(['active', 'deactivated'], 'Choose active or deactivated').optional(),
  })
  .refine((b) => Object.keys(b).length > 0, 'Nothing to change')
export type UpdateUserBody = z.infer<typeof updateUserBody>

export interface StaffUser {
  id: number
  email: string
  name: string
  role: (typeof STAFF_ROLES)[number]
  status: (typeof USER_STATUSES)[number]
  createdAt: string
  lastLoginAt: string | null
}
