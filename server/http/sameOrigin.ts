import type { NextFunction, Request, Response } from 'express'
import { forbidden } from '../errors'

// Cross-site request forgery: a page elsewhere can make a signed-in browser post a form here, and
// SameSite=Lax does not stop a sibling site on the same domain or another port of localhost.
// Every write must come from a page this server served: browsers name the page's origin in
// `Origin` on every non-GET request (Fetch standard, "append a request `Origin` header"), and
// in `Sec-Fetch-Site` (Fetch Metadata). A request with neither is not from a browser page and
// so cannot carry someone else's cookie unasked (OWASP CSRF Prevention Cheat Sheet, "Verifying
// origin with standard headers": from memory).

const SAFE = new Set(['GET', 'HEAD', 'OPTIONS'])

function originOf(url: string): string | null {
  try {
    return new URL(url).origin
  } catch {
    return null
  }
}

export function sameOriginWrites(publicUrl: string) {
  const configured = originOf(publicUrl)
  return (req: Request, _res: Response, next: NextFunction) => {
    if (SAFE.has(req.method)) return next()
    const origin = req.get('origin')
    if (origin !== undefined) {
      const own = `${req.protocol}://${req.get('host') ?? ''}`
      if (origin === configured || origin === own) return next()
      return next(forbidden('This request came from another site and was refused'))
    }
    const site = req.get('sec-fetch-site')
    if (site !== undefined && site !== 'same-origin' && site !== 'none')
      return next(forbidden('This request came from another site and was refused'))
    next()
  }
}
