import type { ErrorCode } from '../shared/types/api'

const STATUS: Record<ErrorCode, number> = {
  bad_request: 400,
  validation_failed: 422,
  unauthenticated: 401,
  forbidden: 403,
  not_found: 404,
  conflict: 409,
  rate_limited: 429,
  payload_too_large: 413,
  unsupported_media_type: 415,
  invalid_token: 400,
  internal: 500,
  unavailable: 503,
}

/** The one error type services throw; the error handler turns it into JSON. */
export class AppError extends Error {
  readonly status: number
  constructor(
    readonly code: ErrorCode,
    message: string,
    readonly extra: {
      fields?: Record<string, string[]>
      rows?: { row: number; errors: string[] }[]
      /** A save over a newer revision: the one the row is at now. */
      currentRevision?: number
    } = {},
  ) {
    super(message)
    this.status = STATUS[code]
  }
}

export const badRequest = (message: string) => new AppError('bad_request', message)
export const notFound = (what = 'That') => new AppError('not_found', `${what} was not found`)
export const conflict = (message: string, fields?: Record<string, string[]>) =>
  new AppError('conflict', message, { fields })
/** A save over a newer revision than the form was loaded at: nothing was written. */
export const staleRevision = (what: string, currentRevision: number) =>
  new AppError(
    'conflict',
    `Someone saved this ${what} after you opened it, so your changes were not saved. ` +
      'Reload to see their version, then make your changes again.',
    { currentRevision },
  )
export const forbidden = (message = 'You do not have access to this') =>
  new AppError('forbidden', message)
export const unauthenticated = (message = 'Please sign in') =>
  new AppError('unauthenticated', message)
export const invalidToken = (message: string) => new AppError('invalid_token', message)
export const validationFailed = (
  message: string,
  extra: { fields?: Record<string, string[]>; rows?: { row: number; errors: string[] }[] },
) => new AppError('validation_failed', message, extra)
