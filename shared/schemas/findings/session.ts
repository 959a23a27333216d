import type { Instrument, PlayerLevel } from '../../constants'
import type { PAdjustment, SessionFormat, SessionStatus } from '../sessions/design'
import type { AgingFindings } from './aging'
import type { AttributeFindings } from './attributes'
import type { FindingsReason, RecipeRef } from './common'
import type { ObjectiveRow } from './objective'
import type { ReliabilityFindings, TriangleFindings } from './panel'
import type { PreferenceFindings } from './preferences'

// The findings of one session, as GET /api/findings/:id answers.
// Staff only: recipes appear by id and name here, so nothing in this file may ever reach a
// player's screen.

export interface FindingsSummary {
  invited: number
  done: number
  inProgress: number
  excluded: number
  answers: number
  /** done / invited, 0 when nobody is invited. */
  completion: number
}

/** What the findings were computed from. */
export interface FindingsProvenance {
  /** Stored answers of the session's invitations (revoked ones left out). */
  answers: number
  /** Players with at least one answer. */
  players: number
  excluded: number
  /** Of `excluded`, those left out by default because their headphone check failed. */
  headphoneExcluded: number
  lastAnswerAt: string | null
  /** The latest audited change that can alter findings: exclusion, design edit, open, close. */
  lastChange: { action: string; at: string } | null
}

export interface SessionFindings {
  session: {
    id: number
    name: string
    format: SessionFormat
    status: SessionStatus
    timePointLabel: string | null
    /** How every adjusted p on the page was adjusted: the session's design chose it. */
    adjustment: PAdjustment
  }
  summary: FindingsSummary
  filters: {
    instrument: Instrument | null
    level: PlayerLevel | null
    available: { instruments: Instrument[]; levels: PlayerLevel[] }
  }
  /** Why the page has nothing to show (e.g. "not enough data: no answers yet"); null otherwise. */
  reason: FindingsReason
  recipes: RecipeRef[]
  /** Line-scale findings (attribute rating and play-test); empty for other formats. */
  attributes: AttributeFindings[]
  preferences: PreferenceFindings | null
  triangle: TriangleFindings | null
  reliability: ReliabilityFindings
  objective: ObjectiveRow[]
  aging: AgingFindings | null
  provenance: FindingsProvenance
}
