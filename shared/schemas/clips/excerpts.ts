import { z } from 'zod'
import { visibleText } from '../visibleText'

// The managed list of passages that clips play.

export const createExcerptBody = z.strictObject({
  name: visibleText(z.string().trim().min(1, 'Required').max(80, 'At most 80 characters')),
  description: z.string().trim().max(500, 'At most 500 characters').default(''),
})
export type CreateExcerptBody = z.input<typeof createExcerptBody>

export const updateExcerptBody = z
  .strictObject({
    name: createExcerptBody.shape.name.optional(),
    description: z.string().trim().max(500, 'At most 500 characters').optional(),
    active: z.boolean('Active is true or false').optional(),
  })
  .refine((b) => Object.keys(b).length > 0, 'Nothing to change')
export type UpdateExcerptBody = z.infer<typeof updateExcerptBody>

export interface Excerpt {
  id: number
  name: string
  description: string
  active: boolean
  clipCount: number
}
