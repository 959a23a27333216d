// Credentials never reach the log. Tokens should not be in URLs at all (players send theirs in
// a header, mail links carry theirs in the fragment), but an old mail, a hand-typed address or
// a client of someone else's may still put one there: the log line is cleaned either way.

const REDACTED = '[redacted]'

/** Three base64url segments, the first opening a JSON object: the shape of every JWT. */
const JWT = /eyJ[\w-]*\.[\w-]+\.[\w-]*/g

/** Query parameters whose values are credentials, whatever their case. */
const SECRET_PARAMS = /^(token|access_token|id_token|code|key|secret|password|sig|signature)$/i

/** A request target as it may be logged: secret query values and token-shaped parts replaced. */
export function redactUrl(url: string | undefined): string {
  if (!url) return ''
  const at = url.indexOf('?')
  const path = (at < 0 ? url : url.slice(0, at)).replace(JWT, REDACTED)
  if (at < 0) return path
  const query = url
    .slice(at + 1)
    .split('&')
    .map((pair) => {
      const eq = pair.indexOf('=')
      const name = eq < 0 ? pair : pair.slice(0, eq)
      let decoded = name
      try {
        decoded = decodeURIComponent(name)
      } catch {
        // A malformed escape is logged as sent, its value still cleaned below.
      }
      if (eq >= 0 && SECRET_PARAMS.test(decoded)) return `${name}=${REDACTED}`
      return pair.replace(JWT, REDACTED)
    })
    .join('&')
  return `${path}?${query}`
}
