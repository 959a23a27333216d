// The steps before the trials taken through the API, for browser tests and benchmarks that are
// about the trial screens: consent, the headphone check as the server deals it (answered
// right), and the level.

async function post<T>(base: string, path: string, body: unknown): Promise<T> {
  const res = await fetch(`${base}/api/player/${path}`, {
    method: 'POST',
    headers: { 'Content-Type': 'application/json' },
    body: JSON.stringify(body),
  })
  if (!res.ok) throw new Error(`${path}: ${res.status} ${await res.text()}`)
  return (await res.json()) as T
}

export async function passChecksByApi(base: string, token: string): Promise<void> {
  await post(base, 'consent', { token })
  const deal = await post<{ attempt: number; trials: { tones: string[] }[] }>(
    base,
    'headphone/start',
    { token },
  )
  const responses = deal.trials.map((t) => t.tones.indexOf('quiet'))
  const state = await post<{ headphone: { passed: boolean } | null }>(base, 'headphone', {
    token,
    attempt: deal.attempt,
    responses,
  })
  if (!state.headphone?.passed) throw new Error('the headphone check did not pass')
  await post(base, 'level', { token })
}
