import type { z } from 'zod'

// Names people type are read by other people: a name made only of characters that draw nothing
// (zero-width spaces, word joiners, direction overrides) is a blank row in every list and a
// blank line on a printout, and two such names cannot be told apart.

export const VISIBLE_MESSAGE = 'Use at least one visible character'

// One character that draws something. Left out: controls (Cc), format characters such as
// zero-width spaces and direction marks (Cf), spaces and line and paragraph separators (Zs, Zl,
// Zp), variation selectors, the other default-ignorable code points (the Hangul fillers, the
// combining grapheme joiner), which fonts draw as nothing, and the blank braille cell.
const VISIBLE =
  /[^\p{Cc}\p{Cf}\p{Zs}\p{Zl}\p{Zp}\p{Variation_Selector}\p{Default_Ignorable_Code_Point}\u2800]/u

export function hasVisibleCharacter(text: string): boolean {
  return VISIBLE.test(text)
}

/**
 * A name field that must show something: give it a string schema that already trims and has its
 * own required and length messages. The value is stored as typed (an accent, an emoji and the
 * joiners inside it stay); only a value with nothing visible is refused. An empty value is left
 * to the field's "Required", so a blank field reads as it always did.
 */
export function visibleText<T extends z.ZodString>(schema: T): T {
  return schema.refine((s) => s === '' || hasVisibleCharacter(s), VISIBLE_MESSAGE)
}
