import type { RequestHandler } from 'express'
import { AppError } from '../errors'

/** Megabytes as the upload limits count them (MiB). */
export const megabytes = (mb: number) => Math.round(mb * 1024 * 1024)

/** The refusal of a request whose files together pass the limit of one upload. */
export function uploadTooLarge(maxMb: number): AppError {
  return new AppError(
    'payload_too_large',
    `The files of this upload come to more than the limit of ${maxMb} MB for one upload; nothing was stored`,
  )
}

/**
 * Refuses a request whose declared length already passes the limit, before a byte of it is
 * read (RFC 9110 §15.5.14, 413 Content Too Large). The body is its files plus a little of
 * part headers and fields, so a batch within those few kilobytes of the cap may be refused here
 * rather than as its files arrive: the cap guards memory and disk, it is not an exact quota. A
 * request without a length (chunked) goes on, to be counted as it streams.
 */
export function refuseDeclaredOver(maxMb: number): RequestHandler {
  const limit = megabytes(maxMb)
  return (req, _res, next) => {
    const declared = Number(req.get('content-length'))
    if (Number.isFinite(declared) && declared > limit) return next(uploadTooLarge(maxMb))
    next()
  }
}
