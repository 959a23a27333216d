import bcrypt from 'bcryptjs'
import type { Knex } from 'knex'
import { DEMO_PASSWORD, DEMO_STAFF } from '../../server/auth/demoAccounts'
import { insertPlayer } from '../../server/panel/service'
import type { Instrument, PlayerLevel } from '../../shared/constants'

/*
 * The demo scenario: Larchmere String Works, an invented maker of strings for bowed
 * instruments, and its invented panel of players. Added once; later starts leave it alone.
 */

const PLAYERS: [string, string, Instrument[], PlayerLevel, string, string | null][] = [
  ['Ilse Marchetti', 'ilse.marchetti', ['violin'], 'professional', 'North', '2026-09-02'],
  ['Kofi Brandvold', 'kofi.brandvold', ['cello'], 'professional', 'North', '2026-09-02'],
  ['Noor Halloran', 'noor.halloran', ['viola', 'violin'], 'teacher', 'West', '2026-09-05'],
  ['Pavel Oyelaran', 'pavel.oyelaran', ['double bass'], 'professional', 'South', '2026-09-06'],
  ['Saskia Lindqvist', 'saskia.lindqvist', ['violin'], 'student', 'East', '2026-09-08'],
  ['Tarek Villanueva', 'tarek.villanueva', ['cello'], 'teacher', 'East', '2026-09-08'],
  ['Wren Adebayo', 'wren.adebayo', ['violin'], 'amateur', 'West', '2026-09-10'],
  ['Yusuf Kaminski', 'yusuf.kaminski', ['viola'], 'professional', 'North', '2026-09-11'],
  ['Zelda Okonkwo', 'zelda.okonkwo', ['violin', 'viola'], 'professional', 'South', '2026-09-12'],
  ['Anselm Fairweather', 'anselm.fairweather', ['cello'], 'student', 'North', '2026-09-14'],
  ['Bettina Haraldsen', 'bettina.haraldsen', ['double bass'], 'teacher', 'West', '2026-09-15'],
  ['Caspian Mbeki', 'caspian.mbeki', ['violin'], 'student', 'South', '2026-09-15'],
  ['Dalia Strand', 'dalia.strand', ['viola'], 'amateur', 'East', '2026-09-17'],
  ['Emrys Kowalczyk', 'emrys.kowalczyk', ['cello'], 'professional', 'South', '2026-09-18'],
  ['Freya Nakamura-Holt', 'freya.nakamura-holt', ['violin'], 'teacher', 'North', '2026-09-20'],
  ['Gideon Thorsby', 'gideon.thorsby', ['double bass', 'cello'], 'amateur', 'East', null],
  ['Hana Castellane', 'hana.castellane', ['violin'], 'professional', 'West', '2026-09-22'],
  ['Ivo Renshaw', 'ivo.renshaw', ['viola'], 'student', 'South', '2026-09-23'],
  ['Jorun Achebe', 'jorun.achebe', ['cello'], 'teacher', 'West', '2026-09-25'],
  ['Lior Ferreira-Quist', 'lior.ferreira-quist', ['violin'], 'amateur', 'North', '2026-09-26'],
]

/**
 * The demo staff (with the demo password, which no sign-up flow would give them) and the panel,
 * each player added through the panel service.
 */
export async function seedDemoPanel(knex: Knex): Promise<void> {
  if (await knex('users').where({ email: DEMO_STAFF[0].email }).first()) return

  const now = new Date().toISOString()
  const hash = await bcrypt.hash(DEMO_PASSWORD, 10)
  await knex.transaction(async (trx) => {
    for (const s of DEMO_STAFF) {
      await trx('users').insert({
        email: s.email,
        name: s.name,
        role: s.role,
        status: 'active',
        password_hash: hash,
        created_at: now,
        updated_at: now,
      })
    }
    for (const [name, local, instruments, level, region, consent] of PLAYERS) {
      await insertPlayer(trx, now, {
        name,
        email: `${local}@players.larchmere.test`,
        instruments,
        level,
        region,
        consentDate: consent,
        notes: consent ? '' : 'Consent form not yet returned',
      })
    }
    // One player who has stepped back from the panel for now.
    await trx('players')
      .where({ email: 'gideon.thorsby@players.larchmere.test' })
      .update({ status: 'inactive' })
  })
}
