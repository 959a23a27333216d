import { Agent, request } from 'node:http'
import { percentile } from './serverProcess'

export interface OpenLoopResult {
  /** Each save's time, from when it was due to be sent until its answer came. */
  latencies: number[]
  failed: number
}

/**
 * Answer saves sent at a steady rate whatever the server does, each timed from the moment it
 * was due, not from when it went out: a server that stops for three seconds then shows as
 * three seconds on every save due meanwhile. (A fixed number of connections each waiting for
 * its answer would send nothing during a stop, and the stop would hide in the p99.)
 */
export function openLoopSaves(
  base: string,
  bodies: { path: string; body: string }[],
  perSecond: number,
): { stop(): Promise<OpenLoopResult> } {
  const agent = new Agent({ keepAlive: true, maxSockets: 256 })
  const url = new URL(base)
  const latencies: number[] = []
  let failed = 0
  const inFlight = new Set<Promise<void>>()
  const started = performance.now()
  let sent = 0
  let stopped = false

  const save = (due: number, b: { path: string; body: string }) =>
    new Promise<void>((resolve) => {
      const req = request(
        {
          agent,
          host: url.hostname,
          port: url.port,
          method: 'PUT',
          path: b.path,
          headers: {
            'content-type': 'application/json',
            'content-length': Buffer.byteLength(b.body),
          },
        },
        (res) => {
          res.resume()
          res.on('end', () => {
            if (res.statusCode === 200) latencies.push(performance.now() - due)
            else failed++
            resolve()
          })
        },
      )
      req.on('error', () => {
        failed++
        resolve()
      })
      req.end(b.body)
    })

  // Catches up on every save that fell due since the last tick, so timer lag costs no saves.
  const tick = setInterval(() => {
    const dueNow = Math.floor(((performance.now() - started) * perSecond) / 1000)
    for (; sent < dueNow && !stopped; sent++) {
      const p = save(started + (sent * 1000) / perSecond, bodies[sent % bodies.length])
      inFlight.add(p)
      void p.then(() => inFlight.delete(p))
    }
  }, 2)

  return {
    async stop() {
      stopped = true
      clearInterval(tick)
      await Promise.all(inFlight)
      agent.destroy()
      return { latencies, failed }
    },
  }
}

export const p99 = (r: OpenLoopResult) => percentile(r.latencies, 99)
