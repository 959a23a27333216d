/* The words more than one section of the findings page puts in its sentences. */

/** Comparatives for the default attributes, so sentences read "brighter", not "higher on". */
export const HIGHER: Record<string, string> = {
  brightness: 'brighter',
  warmth: 'warmer',
  bow_response: 'quicker to respond',
}

/** A share as a whole percentage. */
export const percent = (x: number) => `${Math.round(x * 100)}%`
