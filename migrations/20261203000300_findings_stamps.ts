import type { Knex } from 'knex'

// A counter per study (a session and its time points) that every change the findings read
// moves on, so cached findings are known to be current with one indexed read. Triggers, not
// service code, move it: every path that writes these tables (the answer path, exclusions,
// design edits, the seeds, a restore, tomorrow's new route) is covered by construction.
// Row 0 is the panel-wide counter for players, recipes and clips, which many studies share.

const STUDY_OF_SESSION = (ref: string) =>
  `coalesce((SELECT coalesce(parent_session_id, id) FROM sessions WHERE id = ${ref}), 0)`
const STUDY_OF_INVITATION = (ref: string) =>
  `coalesce((SELECT coalesce(s.parent_session_id, s.id) FROM invitations i
    JOIN sessions s ON s.id = i.session_id WHERE i.id = ${ref}), 0)`

/** Which study a changed row belongs to, given the row's alias (NEW or OLD). */
const WATCHED: Record<string, (row: string) => string> = {
  answers: (row) => STUDY_OF_INVITATION(`${row}.invitation_id`),
  headphone_checks: (row) => STUDY_OF_INVITATION(`${row}.invitation_id`),
  invitations: (row) => STUDY_OF_SESSION(`${row}.session_id`),
  served_plans: (row) => STUDY_OF_SESSION(`${row}.session_id`),
  exclusions: (row) => STUDY_OF_SESSION(`${row}.session_id`),
  headphone_inclusions: (row) => STUDY_OF_SESSION(`${row}.session_id`),
  sessions: (row) => `coalesce(${row}.parent_session_id, ${row}.id)`,
  // Provenance names the last audited change of a session (see WHEN below).
  audit_log: (row) => STUDY_OF_SESSION(`CAST(${row}.target_id AS INTEGER)`),
  players: () => '0',
  recipes: () => '0',
  clips: () => '0',
}

const EVENTS = [
  ['insert', 'NEW'],
  ['update', 'NEW'],
  ['delete', 'OLD'],
] as const

const triggerName = (table: string, event: string) => `findings_stamp_${table}_${event}`

export async function up(knex: Knex): Promise<void> {
  await knex.schema.createTable('findings_stamps', (t) => {
    t.integer('study_id').primary()
    t.integer('stamp').notNullable()
  })
  for (const [table, studyOf] of Object.entries(WATCHED))
    for (const [event, row] of EVENTS) {
      const study = studyOf(row)
      // An audit entry about anything but a session moves no counter.
      const when = table === 'audit_log' ? `WHEN ${row}.target_type = 'session'` : ''
      await knex.raw(`
        CREATE TRIGGER ${triggerName(table, event)} AFTER ${event.toUpperCase()} ON ${table}
        ${when}
        BEGIN
          INSERT INTO findings_stamps (study_id, stamp) VALUES ((${study}), 1)
            ON CONFLICT (study_id) DO UPDATE SET stamp = stamp + 1;
        END`)
    }
}

export async function down(knex: Knex): Promise<void> {
  for (const table of Object.keys(WATCHED))
    for (const [event] of EVENTS)
      await knex.raw(`DROP TRIGGER IF EXISTS ${triggerName(table, event)}`)
  await knex.schema.dropTableIfExists('findings_stamps')
}
