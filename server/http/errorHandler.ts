import type { NextFunction, Request, Response } from 'express'
import type { Logger } from 'pino'
import { MulterError } from 'multer'
import { AppError } from '../errors'
import { redactUrl } from './redact'
import type { ApiErrorBody } from '../../shared/types/api'

function send(res: Response, status: number, body: ApiErrorBody) {
  res.status(status).json(body)
}

/** The one place errors become responses; anything unexpected is a bare 500. */
export function errorHandler(logger: Logger) {
  return (err: unknown, req: Request, res: Response, _next: NextFunction) => {
    if (res.headersSent) return
    if (err instanceof AppError) {
      return send(res, err.status, {
        error: { code: err.code, message: err.message, ...err.extra },
      })
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
