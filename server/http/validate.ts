import type { Request, RequestHandler, Response } from 'express'
import type { z } from 'zod'
import { validationFailed, type AppError } from '../errors'
import { zodFields } from '../../shared/schemas/fieldErrors'
import type { OnInvalid, RouteDef } from './routeTable'

const invalid = (error: z.ZodError): AppError =>
  validationFailed('Some fields need attention', { fields: zodFields(error) })

/** Parses input at the edge; a failure becomes one 422 with every field's problem. */
export function parse<S extends z.ZodType>(schema: S, value: unknown): z.output<S> {
  const result = schema.safeParse(value ?? {})
  if (!result.success) throw invalid(result.error)
  return result.data
}

type Reader = (value: unknown, req: Request, res: Response) => unknown

function reader(schema: z.ZodType, onInvalid: OnInvalid | undefined): Reader {
  if (!onInvalid) return (value) => parse(schema, value)
  return (value, req, res) => {
    const result = schema.safeParse(value ?? {})
    if (!result.success) throw onInvalid(invalid(result.error), req, res)
    return result.data
  }
}

/**
 * The validate step: parses the declared params, headers, query and body (in that order, the first
 * failure answers) and calls the handler with them. The readers are built once per route and
 * the call stays synchronous, so a request pays for its parse calls and one small object only;
 * a part with no schema is not read at all (Express parses `req.query` on every access).
 */
export function withInput(def: RouteDef): RequestHandler {
  const { handler, onInvalid = {} } = def
  const params = def.params && reader(def.params, onInvalid.params)
  const headers = def.headers && reader(def.headers, onInvalid.headers)
  const query = def.query && reader(def.query, onInvalid.query)
  const body = def.body && reader(def.body, onInvalid.body)
  return (req, res) =>
    handler(req, res, {
      params: params?.(req.params, req, res),
      headers: headers?.(req.headers, req, res),
      query: query?.(req.query, req, res),
      body: body?.(req.body, req, res),
    })
}
