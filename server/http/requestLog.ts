import type { NextFunction, Request, Response } from 'express'
import type { Logger } from 'pino'
import { redactUrl } from './redact'

/**
 * One short line per API request when its answer has gone out (or the client gave up), through
 * the app's pino logger: method, the URL cleaned of anything that works as a credential, status
 * and time taken. Headers (cookies and tokens among them) never reach the log.
 *
 * The line is written at the end and nothing is built before it. A per-request child logger,
 * made eagerly with the request serialised into it, cost a tenth of an answer save's time; nothing
 * here reads a request-scoped logger (errors are logged by the error handler, with the URL).
 */
export function requestLog(logger: Logger) {
  return (req: Request, res: Response, next: NextFunction) => {
    if (!req.url.startsWith('/api') || !logger.isLevelEnabled('info')) return next()
    const started = performance.now()
    const done = () => {
      res.off('finish', done)
      res.off('close', done)
      const line = {
        req: { method: req.method, url: redactUrl(req.originalUrl) },
        res: { status: res.statusCode },
        responseTime: Math.round(performance.now() - started),
      }
      logger.info(line, res.writableFinished ? 'request completed' : 'request aborted')
    }
    res.on('finish', done)
    res.on('close', done)
    next()
  }
}
