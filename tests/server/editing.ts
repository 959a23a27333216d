import type { Agent } from './helpers'

// Saves as the staff edit forms make them: the form is loaded (its revision read), then the
// changes are sent with that revision. Tests of refused saves send a revision of their own.

const KEYS: Record<string, string> = {
  sessions: 'session',
  recipes: 'recipe',
  clips: 'clip',
  players: 'player',
}

/** The revision an edit form opened on `path` (`/api/recipes/7`) would be loaded at. */
export async function revisionOf(agent: Agent, path: string): Promise<number> {
  const kind = /\/api\/(?:panel\/)?(\w+)\/\d+$/.exec(path)?.[1] ?? ''
  const key = KEYS[kind]
  if (!key) throw new Error(`no edit form reads ${path}`)
  const res = await agent.get(path)
  if (res.status !== 200) throw new Error(`reading ${path} answered ${res.status}`)
  return (res.body as Record<string, { revision: number }>)[key].revision
}

/** Loads the row at `path` as its edit form does, then saves `changes` over that revision. */
export async function saveEdit(agent: Agent, path: string, changes: Record<string, unknown>) {
  const revision = await revisionOf(agent, path)
  return agent.patch(path).send({ ...changes, revision })
}
