import { describe, expect, it } from 'vitest'
import { createKnex } from '../../server/db/knex'
import { prepareDatabase } from '../../server/db/prepare'

// Rolling back never loses records. On SQLite, knex drops a column by rebuilding the table, and
// dropping the old table inside the migration's transaction cascades to the rows that refer to
// it: a rollback of a column on sessions would take every invitation and answer with it.

const FIRST_ROLLED_BACK = '20261202000000'

describe('rolling migrations back', () => {
  it('keeps every session, invitation and answer through each step down', async () => {
    const knex = createKnex(':memory:')
    try {
      await prepareDatabase(knex)
      const now = new Date().toISOString()
      const [sessionId] = await knex('sessions').insert({
        name: 'Rollback check',
        format: 'pair',
        seed: 'abc',
        deadline: '2026-12-20',
        created_at: now,
        updated_at: now,
      })
      const [playerId] = await knex('players').insert({
        code: 'P-DOWN1',
        instruments: '["violin"]',
        level: 'professional',
        status: 'active',
        created_at: now,
        updated_at: now,
      })
      const [invitationId] = await knex('invitations').insert({
        session_id: sessionId,
        player_id: playerId,
        player_index: 0,
        invited_at: now,
        last_sent_at: now,
      })
      await knex('answers').insert({
        invitation_id: invitationId,
        trial_index: 0,
        payload: '{}',
        answered_at: now,
      })
      const counts = async () =>
        Promise.all(
          ['sessions', 'invitations', 'answers'].map((t) => knex(t).count({ n: '*' })),
        ).then((r) => r.map((x) => Number(x[0].n)))

      const steps: string[] = []
      while ((await knex.migrate.currentVersion()) >= FIRST_ROLLED_BACK) {
        steps.push(await knex.migrate.currentVersion())
        await knex.migrate.down()
        expect(await counts(), `after rolling back ${steps.at(-1)}`).toEqual([1, 1, 1])
      }
      expect(steps.length).toBeGreaterThanOrEqual(5)
      await knex.migrate.latest()
      expect(await counts()).toEqual([1, 1, 1])
    } finally {
      await knex.destroy()
    }
  })
})
