import type { Knex } from 'knex'

// Moves the headphone result each invitation kept (the latest check only, with a count of
// attempts) into headphone_checks. Only what is known is written: the latest result, under its
// attempt number, scored by the pass rule of the time (5 of 6, Woods et al. 2017); earlier
// attempts and the tones dealt were never kept. The check's own time was not kept either: the
// level step that follows it, or else the consent before it, stands in.

interface Kept {
  id: number
  headphone_correct: number
  headphone_trials: number
  headphone_attempts: number
  consent_at: string | null
  level_set_at: string | null
  opened_at: string | null
  invited_at: string
}

const passed = (correct: number, trials: number) => trials >= 6 && correct * 6 >= 5 * trials

export async function up(knex: Knex): Promise<void> {
  if (!(await knex.schema.hasColumn('invitations', 'headphone_correct'))) return
  const kept: Kept[] = await knex('invitations as i')
    .leftJoin('headphone_checks as h', 'h.invitation_id', 'i.id')
    .whereNotNull('i.headphone_correct')
    .whereNotNull('i.headphone_trials')
    .whereNull('h.id')
    .select(
      'i.id',
      'i.headphone_correct',
      'i.headphone_trials',
      'i.headphone_attempts',
      'i.consent_at',
      'i.level_set_at',
      'i.opened_at',
      'i.invited_at',
    )
  for (const k of kept) {
    await knex('headphone_checks').insert({
      invitation_id: k.id,
      attempt: Math.max(1, k.headphone_attempts),
      dealt: null,
      responses: null,
      correct: k.headphone_correct,
      trials: k.headphone_trials,
      passed: passed(k.headphone_correct, k.headphone_trials),
      dealt_at: null,
      at: k.level_set_at ?? k.consent_at ?? k.opened_at ?? k.invited_at,
    })
  }
}

// The invitations keep their columns, so going back loses nothing.
export async function down(knex: Knex): Promise<void> {
  if (await knex.schema.hasTable('headphone_checks'))
    await knex('headphone_checks').whereNull('dealt').delete()
}
