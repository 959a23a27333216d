import { z } from 'zod'
import { visibleText } from '../visibleText'

/** An attribute as it is copied into a session: later edits elsewhere cannot change it. */
export const attributeSpec = z.strictObject({
  key: z
    .string()
    .trim()
    .regex(/^[a-z][a-z0-9_]{0,39}$/, 'Lower-case letters, digits and _; starts with a letter'),
  name: visibleText(z.string().trim().min(1, 'Required').max(60)),
  low: visibleText(z.string().trim().min(1, 'Required').max(40)),
  high: visibleText(z.string().trim().min(1, 'Required').max(40)),
})
export type AttributeSpec = z.infer<typeof attributeSpec>

/** The default attributes of a new session (ours, from the brief). */
export const DEFAULT_ATTRIBUTES: AttributeSpec[] = [
  { key: 'brightness', name: 'Brightness', low: 'dark', high: 'bright' },
  { key: 'bow_response', name: 'Bow response', low: 'slow to speak', high: 'immediate' },
  { key: 'warmth', name: 'Warmth', low: 'thin', high: 'warm' },
]
