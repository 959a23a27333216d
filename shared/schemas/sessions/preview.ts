import { z } from 'zod'
import type { AttributeSpec } from './attributes'
import type { SessionFormat } from './design'

// The staff preview of one player's plan, shown as that player would see it.

export const previewQuery = z.object({
  player: z.coerce.number().int().min(1, 'Players count from 1').max(10_000).default(1),
})

/** A clip as a player meets it: a code and an address that says nothing about the recipe. */
export interface PreviewClip {
  code: number
  audioUrl: string
}

export interface PreviewTrial {
  index: number
  kind: SessionFormat
  /** Listening formats: one clip (rating), two (pair) or three (triangle), in serving order. */
  clips: PreviewClip[]
  /** Play-tests: the blind code on the set to play. */
  setCode: number | null
}

/** Exactly what one player sees: codes, scales and trials; no recipe, no repeat marks. */
export interface SessionPreview {
  playerTitle: string
  format: SessionFormat
  playerMessage: string
  deadline: string
  cautions: string[]
  attributes: AttributeSpec[]
  allowNoPreference: boolean
  trials: PreviewTrial[]
}
