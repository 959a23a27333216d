// When a mail that failed is tried again, and when the outbox stops trying. Pure, so the rule
// can be read and tested on its own.

/**
 * The wait after the `attempts`-th failed try: the base doubling with each failure, never more
 * than the cap, so a mail server that is down for a day is asked every `maxMs` and not hammered.
 */
export function retryWaitMs(attempts: number, baseMs: number, maxMs: number): number {
  return Math.min(maxMs, baseMs * 2 ** Math.max(0, attempts - 1))
}

/**
 * Mail of a session is never given up on for its failures: it waits for as long as its session
 * is open (sessionMail.ts ends it when the session does). Mail of no session (staff accounts,
 * passwords) is given up after `maxAttempts` tries and shown as failed, where staff can retry.
 */
export function givesUp(sessionId: number | null, attempts: number, maxAttempts: number): boolean {
  return sessionId === null && attempts >= maxAttempts
}

/** nodemailer's codes for a refusal of this one mail (its recipients, its content). */
const ABOUT_THIS_MAIL = new Set(['EENVELOPE', 'EMESSAGE'])

/**
 * Whether a failure says the mail server cannot be reached or will not talk (refused, timed
 * out, closed, unknown host, failed sign-in) rather than refusing this one mail. After such a
 * failure the rest of the run waits for the next tick: every other mail would only wait out the
 * same timeout.
 */
export function isServerTrouble(err: unknown): boolean {
  const code = (err as { code?: unknown } | null)?.code
  return !(typeof code === 'string' && ABOUT_THIS_MAIL.has(code))
}
