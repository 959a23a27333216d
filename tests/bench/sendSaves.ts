import autocannon from 'autocannon'

/** Answer saves ready to send: the path of each and its JSON body. */
export type SaveBodies = { path: string; body: string }[]

/** What the load generator saw, with the rate over the time the answers actually took. */
export interface Sent {
  result: autocannon.Result
  /** Answers per second from the first request sent to the last answer received. */
  rate: number
}

/**
 * Sends every save once over `connections` connections, each sending its next save when the
 * last is answered. The rate is timed here, from the start to the last answer: autocannon's own
 * start and finish (and its average) fall on its once-a-second tick, so a run of a few seconds
 * would be rounded up to whole seconds.
 */
export async function sendSaves(
  base: string,
  bodies: SaveBodies,
  connections: number,
): Promise<Sent> {
  let next = 0
  let lastAnswer = 0
  const started = performance.now()
  const result = await new Promise<autocannon.Result>((resolve, reject) => {
    const instance = autocannon(
      {
        url: base,
        connections,
        amount: bodies.length,
        requests: [
          {
            method: 'PUT',
            headers: { 'content-type': 'application/json' },
            setupRequest: (req) => {
              const b = bodies[next++ % bodies.length]
              return { ...req, path: b.path, body: b.body }
            },
          },
        ],
      },
      (err, r) => (err ? reject(err) : resolve(r)),
    )
    instance.on('response', () => (lastAnswer = performance.now()))
  })
  return { result, rate: result.requests.total / ((lastAnswer - started) / 1000) }
}
