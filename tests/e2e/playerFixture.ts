import { encodeWav, synth } from '../../server/audio/index.ts'

// Staff work done over the HTTP API, as the designer pages do it: recordings uploaded, a
// session built over them, opened, and one panel player invited. Tests start with no demo clips.

export interface Staff {
  get<T>(path: string): Promise<T>
  send<T>(method: string, path: string, body?: unknown): Promise<T>
}

export async function signInStaff(base: string, email: string): Promise<Staff> {
  const login = await fetch(`${base}/api/auth/login`, {
    method: 'POST',
    headers: { 'Content-Type': 'application/json' },
    body: JSON.stringify({ email, password: 'ringdown-demo' }),
  })
  if (!login.ok) throw new Error(`sign-in: ${login.status}`)
  const cookie = login.headers
    .getSetCookie()
    .map((c) => c.split(';')[0])
    .join('; ')
  const call = async <T>(method: string, path: string, body?: unknown): Promise<T> => {
    const form = body instanceof FormData
    const res = await fetch(`${base}/api${path}`, {
      method,
      headers: { cookie, ...(body && !form ? { 'Content-Type': 'application/json' } : {}) },
      body: form ? body : body === undefined ? undefined : JSON.stringify(body),
    })
    const data = (await res.json().catch(() => null)) as T
    if (!res.ok) throw new Error(`${method} ${path}: ${res.status} ${JSON.stringify(data)}`)
    return data
  }
  return { get: (path) => call('GET', path), send: call }
}

/** A short bowed-like note; each recipe's tone differs a little so the switches are audible. */
function recording(f0: number, seconds = 3): Blob {
  const tone = synth.bowedTone({ f0, seconds, attackSeconds: 0.08 })
  return new Blob([Buffer.from(encodeWav([tone], 48_000, { bitDepth: 16 }))], {
    type: 'audio/wav',
  })
}

export async function uploadClip(
  staff: Staff,
  clip: { recipeId: number; excerptId: number; performer: string; f0: number },
): Promise<number> {
  const form = new FormData()
  form.set('recipeId', String(clip.recipeId))
  form.set('excerptId', String(clip.excerptId))
  form.set('performerCode', clip.performer)
  form.set('instrumentCode', 'VN-E2E')
  form.set('kind', 'bowed')
  form.set('file', recording(clip.f0), `take-${clip.performer}-${clip.recipeId}.wav`)
  const { clip: stored } = await staff.send<{ clip: { id: number } }>('POST', '/clips', form)
  return stored.id
}

let rounds = 0

/**
 * An open session over three demo recipes in two matched sets, with one player invited; the
 * invitation's link is read from the mailbox, as a player would find it.
 */
export async function invitedStudy(
  base: string,
  mailbox: { list(): { to: string; subject: string; text: string }[] },
  design: { format: string; name: string; duplicates?: number; allowNoPreference?: boolean },
): Promise<{
  sessionId: number
  link: string
  playerEmail: string
  playerTitle: string
  staff: Staff
}> {
  const staff = await signInStaff(base, 'developer@ringdown.test')
  const { recipes } = await staff.get<{ recipes: { id: number; name: string }[] }>('/recipes')
  const aurel = recipes.filter((r) => r.name.startsWith('Aurel A')).slice(0, 3)
  const { excerpts } = await staff.get<{ excerpts: { id: number; name: string }[] }>('/excerpts')
  const scale = excerpts.find((e) => e.name === 'scale')!
  const chosen = design.format === 'triangle' ? aurel.slice(0, 2) : aurel
  const clipSets = []
  for (const performer of design.format === 'playtest' ? [] : ['PF-E1', 'PF-E2']) {
    const clipIds = []
    for (const [i, r] of chosen.entries())
      clipIds.push(
        await uploadClip(staff, {
          recipeId: r.id,
          excerptId: scale.id,
          performer,
          f0: 440 + i * 7,
        }),
      )
    clipSets.push({ key: `scale · ${performer}`, clipIds })
  }
  const deadline = new Date(Date.now() + 7 * 86_400_000).toISOString().slice(0, 10)
  // Players see the player title, never the staff name: the mail is found by its subject.
  const playerTitle = `Listening in the browser, round ${++rounds}`
  const { session } = await staff.send<{ session: { id: number } }>('POST', '/sessions', {
    name: design.name,
    playerTitle,
    format: design.format,
    recipeIds: chosen.map((r) => r.id),
    clipSets,
    duplicates: design.duplicates ?? 1,
    allowNoPreference: design.allowNoPreference ?? false,
    playerMessage: 'Use headphones in a quiet room.',
    deadline,
  })
  await staff.send('POST', `/sessions/${session.id}/open`, { acceptSameTake: true })
  const { players } = await staff.get<{ players: { id: number; email: string | null }[] }>(
    '/panel/players',
  )
  const player = players.find((p) => p.email)!
  await staff.send('POST', `/sessions/${session.id}/invitations`, { playerIds: [player.id] })
  const link = await waitFor(() => {
    const mail = mailbox
      .list()
      .find((m) => m.to.includes(player.email!) && m.subject === `Invitation: ${playerTitle}`)
    return mail?.text.match(/https?:\/\/\S+\/p\/[\w.-]+/)?.[0]
  })
  return { sessionId: session.id, link, playerEmail: player.email!, playerTitle, staff }
}

export async function waitFor<T>(probe: () => T | undefined, ms = 10_000): Promise<T> {
  const until = Date.now() + ms
  for (;;) {
    const v = probe()
    if (v !== undefined && v !== null) return v
    if (Date.now() > until) throw new Error('timed out')
    await new Promise((r) => setTimeout(r, 100))
  }
}
