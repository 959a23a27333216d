import type { NextFunction, Request, Response } from 'express'
import type { Logger } from 'pino'
import { MulterError } from 'multer'
import { AppError } from '../errors'
import { redactUrl } from './redact'
import type { ApiErrorBody } from '../../shared/types/api'

function send(res: Response, status: number, body: ApiErrorBody) {
  res.status(status).json(body)
}

/** Why storage refused a request that was itself fine: it says nothing about the request. */
export type Unavailability = 'full' | 'read_only' | 'busy'

/** File-system calls that write: EACCES on these means a folder we must write is shut to us. */
const WRITING_CALLS = new Set([
  'open',
  'write',
  'mkdir',
  'rename',
  'copyfile',
  'unlink',
  'rmdir',
  'rm',
  'link',
  'symlink',
  'chmod',
  'utime',
  'futime',
  'ftruncate',
  'fsync',
])

function kindOf(err: { code?: unknown; syscall?: unknown; name?: unknown }): Unavailability | null {
  const code = typeof err.code === 'string' ? err.code : ''
  // SQLite's extended codes (SQLITE_READONLY_DBMOVED, SQLITE_BUSY_SNAPSHOT, …) share the prefix.
  if (code === 'SQLITE_FULL' || code === 'ENOSPC' || code === 'EDQUOT') return 'full'
  if (code === 'SQLITE_READONLY' || code.startsWith('SQLITE_READONLY_') || code === 'EROFS')
    return 'read_only'
  if ((code === 'EACCES' || code === 'EPERM') && WRITING_CALLS.has(String(err.syscall)))
    return 'read_only'
  if (/^SQLITE_(BUSY|LOCKED)(_|$)/.test(code)) return 'busy'
  // The pool of one connection was held past knex's acquire timeout: busy, not broken.
  if (err.name === 'KnexTimeoutError') return 'busy'
  return null
}

/** The storage condition behind an error, looking through `cause` chains (wrapped errors). */
export function unavailability(err: unknown): Unavailability | null {
  let e: unknown = err
  for (let depth = 0; depth < 5 && e && typeof e === 'object'; depth++) {
    const kind = kindOf(e as Record<string, unknown>)
    if (kind) return kind
    e = (e as { cause?: unknown }).cause
  }
  return null
}

/**
 * What the person sees, and how long a client should wait before trying again (seconds). A
 * full or read-only disk needs someone to act; a busy database frees itself within moments.
 */
export const UNAVAILABLE: Record<Unavailability, { message: string; retryAfter: number }> = {
  full: {
    message:
      'The server has run out of storage space. Nothing was saved; please try again later, and tell the people who run Ringdown if this goes on.',
    retryAfter: 60,
  },
  read_only: {
    message:
      'The server cannot write to its storage at the moment. Nothing was saved; please try again later, and tell the people who run Ringdown if this goes on.',
    retryAfter: 60,
  },
  busy: {
    message: 'The server is busy with other work. Nothing was saved; please try again in a moment.',
    retryAfter: 2,
  },
}

const LOG_LINE: Record<Unavailability, string> = {
  full: 'storage unavailable: disk or database full',
  read_only: 'storage unavailable: database or media folder cannot be written',
  busy: 'storage unavailable: database locked by another writer',
}

/**
 * The one place errors become responses. Storage trouble (full, read-only, locked) is a 503
 * with `Retry-After`, so clients keep what they hold and try again; anything else unexpected is
 * a bare 500.
 */
export function errorHandler(logger: Logger) {
  return (err: unknown, req: Request, res: Response, _next: NextFunction) => {
    if (res.headersSent) return
    if (err instanceof AppError) {
      if (err.status === 503) res.setHeader('Retry-After', '30')
      return send(res, err.status, {
        error: { code: err.code, message: err.message, ...err.extra },
      })
    }
    const kind = unavailability(err)
    if (kind) {
      logger.error({ err, cause: kind, url: redactUrl(req.originalUrl) }, LOG_LINE[kind])
      res.setHeader('Retry-After', String(UNAVAILABLE[kind].retryAfter))
      return send(res, 503, { error: { code: 'unavailable', message: UNAVAILABLE[kind].message } })
    }
    const e = err as { type?: string; status?: number; message?: string }
    if (e?.type === 'entity.parse.failed')
      return send(res, 400, { error: { code: 'bad_request', message: 'Malformed JSON body' } })
    if (e?.type === 'entity.too.large')
      return send(res, 413, { error: { code: 'payload_too_large', message: 'Request too large' } })
    if (err instanceof MulterError) {
      const tooLarge = err.code === 'LIMIT_FILE_SIZE'
      return send(res, tooLarge ? 413 : 400, {
        error: {
          code: tooLarge ? 'payload_too_large' : 'bad_request',
          message: tooLarge ? 'The file is larger than allowed' : `Upload refused: ${err.message}`,
        },
      })
    }
    if (e?.status && e.status >= 400 && e.status < 500)
      return send(res, e.status, { error: { code: 'bad_request', message: 'Bad request' } })
    logger.error({ err, url: redactUrl(req.originalUrl) }, 'unhandled error')
    send(res, 500, { error: { code: 'internal', message: 'Something went wrong on our side' } })
  }
}
