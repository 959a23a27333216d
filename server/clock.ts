/** Time is a dependency so tests can move it (token expiry, mail back-off). */
export interface Clock {
  now(): Date
}

export const systemClock: Clock = { now: () => new Date() }

export function fixedClock(start: Date): Clock & { advance(ms: number): void } {
  let t = start.getTime()
  return {
    now: () => new Date(t),
    advance(ms: number) {
      t += ms
    },
  }
}
