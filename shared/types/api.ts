import type { Role } from '../constants'

/** Stable error codes: clients branch on these, never on message text. */
export const ERROR_CODES = [
  'bad_request',
  'validation_failed',
  'unauthenticated',
  'forbidden',
  'not_found',
  'conflict',
  'rate_limited',
  'payload_too_large',
  'unsupported_media_type',
  'invalid_token',
  'internal',
  /** Storage full or read-only, or the database busy: nothing was saved; try again later. */
  'unavailable',
] as const
export type ErrorCode = (typeof ERROR_CODES)[number]

export interface ApiErrorBody {
  error: {
    code: ErrorCode
    message: string
    /** Field path → messages, for forms. */
    fields?: Record<string, string[]>
    /** Per-row problems of an import. */
    rows?: { row: number; errors: string[] }[]
    /** A save over a newer revision (409 conflict): the revision the row is at now. */
    currentRevision?: number
  }
}

export interface Me {
  id: number
  email: string
  name: string
  role: Role
}
