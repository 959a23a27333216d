import type { AttributeSpec } from './attributes'
import type { ClipSetSpec, PAdjustment, SessionFormat, SessionStatus } from './design'

// Sessions as staff see them: the list and one session with its resolved design.

export interface SessionSummary {
  id: number
  name: string
  format: SessionFormat
  status: SessionStatus
  deadline: string
  recipeCount: number
  invitedCount: number
  doneCount: number
  timePointLabel: string | null
  parentSessionId: number | null
  createdBy: string | null
  /** Who owns the session under the rule in shared/sessionAccess.ts. */
  createdById: number | null
  createdAt: string
}

export interface ResolvedClip {
  id: number
  recipeId: number
  recipeName: string
  originalName: string
  /** Archived since: kept for this session, no longer offered to new ones. */
  archived: boolean
}

/** A matched set as the designer shows it: what was recorded, and by whom. */
export interface ResolvedClipSet extends ClipSetSpec {
  excerptName: string
  performerCode: string
  instrumentCode: string
  clips: ResolvedClip[]
  /** Second takes, served where a trial holds a recipe twice. */
  twins: ResolvedClip[]
  /** The takes' original formats and the one format all renditions of the set share. */
  format?: SetFormatReport
}

/** A recording's format and length. */
export interface AudioFormatFacts {
  sampleRate: number
  channels: number
  bitDepth: number
  durationS: number
}

export interface SetFormatReport {
  /** The chosen clips' originals (played clips, then second takes). */
  originals: (AudioFormatFacts & { clipId: number })[]
  /** What every rendition of the matched set is; all its takes decide, chosen or not. */
  rendition: AudioFormatFacts
  /** Takes in the matched set, chosen or not. */
  takes: number
  /** Every chosen clip's rendition is already written in that format. */
  written: boolean
}

export interface TimePoint {
  id: number
  label: string | null
  status: SessionStatus
}

export interface SessionDetail extends SessionSummary {
  purpose: string
  recipeIds: number[]
  /** The design's sets (key, clipIds) with what each holds. */
  clipSets: ResolvedClipSet[]
  attributes: AttributeSpec[]
  duplicates: number
  allowNoPreference: boolean
  /** How the findings adjust each family of pairs; locked with the design. */
  adjustment: PAdjustment
  /** Smallest difference worth finding (rating points) that the interim look plans for. */
  targetDifference: number | null
  /** What players see instead of the name and purpose, which stay with staff. */
  playerTitle: string
  playerMessage: string
  reminderDaysBefore: number | null
  seed: string
  /** Somebody has answered: the fields in LOCKED_DESIGN_FIELDS can no longer change. */
  locked: boolean
  answersCount: number
  /** Trials each player gets, hidden duplicates included. */
  trialCount: number
  warnings: string[]
  /** Why the served record of this (older) session could not be rebuilt; findings refuse. */
  recordProblem: string | null
  /**
   * Sets where a recipe served twice has one take: players with tools could pair the files.
   * Opening such a session asks the designer to accept it; when, and by whom, is kept.
   */
  sameTakeWarnings: string[]
  sameTakeAccepted: { at: string; by: string | null } | null
  recipes: { id: number; name: string }[]
  /** The first session and every later time point, in order. */
  timePoints: TimePoint[]
  openedAt: string | null
  closedAt: string | null
  /** Moves on with every change (design, opening, closing); an edit sends the one it loaded. */
  revision: number
}
