import type { RequestHandler } from 'express'
import { badRequest } from '../errors'
import type { OnInvalid } from '../http/routeTable'
import { discardTempFiles, filesOf } from './upload'

/**
 * Runs after the upload and before the fields are checked: a request without its file is
 * refused with 400 first, whatever its fields say, and leaves nothing in the temp folder.
 */
export function requireFile(field: string, message: string): RequestHandler {
  return (req, res, next) => {
    if (filesOf(req, field).length > 0) return next()
    discardTempFiles(res)
    next(badRequest(message))
  }
}

/** Refused fields answer the usual 422, with the upload deleted before the answer goes out. */
export const discardUpload: OnInvalid = (failure, _req, res) => {
  discardTempFiles(res)
  return failure
}
