import type { Knex } from 'knex'

/*
 * Demo recipes of the invented maker Larchmere String Works: a violin A string in four damping
 * treatments, and a cello D string wound with round or flat wire. Added once.
 */

type Layer = { material: string; profile: 'round' | 'flat'; wireMm: number }
interface DemoRecipe {
  name: string
  instrument: string
  string_name: string
  core: string
  windings: Layer[]
  damping_kind: string
  damping_grade?: string
  damping_notes?: string
  gauge_mm: number
  vibrating_length_mm: number
  tension_n: number
  parent?: string
  status: string
  notes: string
}

const aurelWindings: Layer[] = [{ material: 'aluminium', profile: 'flat', wireMm: 0.08 }]

const RECIPES: DemoRecipe[] = [
  {
    name: 'Aurel A bare',
    instrument: 'violin',
    string_name: 'A',
    core: 'synthetic multifilament',
    windings: aurelWindings,
    damping_kind: 'none',
    gauge_mm: 0.62,
    vibrating_length_mm: 328,
    tension_n: 52,
    status: 'prototype',
    notes: 'Reference build: nothing between core and winding.',
  },
  {
    name: 'Aurel A light compound',
    instrument: 'violin',
    string_name: 'A',
    core: 'synthetic multifilament',
    windings: aurelWindings,
    damping_kind: 'compound',
    damping_grade: 'V-20 (light)',
    damping_notes: 'Thin bead of viscous compound under the first layer.',
    gauge_mm: 0.63,
    vibrating_length_mm: 328,
    tension_n: 52,
    parent: 'Aurel A bare',
    status: 'prototype',
    notes: 'Aurel A bare with a light compound.',
  },
  {
    name: 'Aurel A heavy compound',
    instrument: 'violin',
    string_name: 'A',
    core: 'synthetic multifilament',
    windings: aurelWindings,
    damping_kind: 'compound',
    damping_grade: 'V-60 (heavy)',
    damping_notes: 'Full coat of the stiffer compound.',
    gauge_mm: 0.64,
    vibrating_length_mm: 328,
    tension_n: 52,
    parent: 'Aurel A light compound',
    status: 'prototype',
    notes: 'Expected darker and quicker to speak.',
  },
  {
    name: 'Aurel A fibre wrap',
    instrument: 'violin',
    string_name: 'A',
    core: 'synthetic multifilament',
    windings: [
      { material: 'synthetic fibre', profile: 'flat', wireMm: 0.03 },
      { material: 'aluminium', profile: 'flat', wireMm: 0.08 },
    ],
    damping_kind: 'fibre layer',
    damping_notes: 'Polyester fibre layer between core and winding.',
    gauge_mm: 0.66,
    vibrating_length_mm: 328,
    tension_n: 52,
    parent: 'Aurel A bare',
    status: 'draft',
    notes: '',
  },
  {
    name: 'Tessel D round',
    instrument: 'cello',
    string_name: 'D',
    core: 'stranded steel',
    windings: [
      { material: 'chrome steel', profile: 'round', wireMm: 0.12 },
      { material: 'chrome steel', profile: 'round', wireMm: 0.1 },
    ],
    damping_kind: 'none',
    gauge_mm: 1.02,
    vibrating_length_mm: 695,
    tension_n: 128,
    status: 'prototype',
    notes: 'Round outer wire.',
  },
  {
    name: 'Tessel D flat',
    instrument: 'cello',
    string_name: 'D',
    core: 'stranded steel',
    windings: [
      { material: 'chrome steel', profile: 'round', wireMm: 0.12 },
      { material: 'chrome steel', profile: 'flat', wireMm: 0.1 },
    ],
    damping_kind: 'none',
    gauge_mm: 1.0,
    vibrating_length_mm: 695,
    tension_n: 128,
    parent: 'Tessel D round',
    status: 'prototype',
    notes: 'Flat outer wire: smoother under the bow, expected a little more damped.',
  },
]

export async function seed(knex: Knex): Promise<void> {
  if (process.env.NODE_ENV === 'production') return
  if (await knex('recipes').where({ name: RECIPES[0].name }).first()) return
  const developer = await knex('users').where({ email: 'developer@ringdown.test' }).first()
  const now = new Date().toISOString()
  const ids = new Map<string, number>()
  await knex.transaction(async (trx) => {
    for (const r of RECIPES) {
      const [id] = await trx('recipes').insert({
        name: r.name,
        instrument: r.instrument,
        string_name: r.string_name,
        core: r.core,
        windings: JSON.stringify(r.windings),
        damping_kind: r.damping_kind,
        damping_grade: r.damping_grade ?? '',
        damping_notes: r.damping_notes ?? '',
        gauge_mm: r.gauge_mm,
        tension_n: r.tension_n,
        vibrating_length_mm: r.vibrating_length_mm,
        version: 1,
        parent_id: r.parent ? ids.get(r.parent) : null,
        status: r.status,
        notes: r.notes,
        created_by: developer?.id ?? null,
        created_at: now,
        updated_at: now,
      })
      ids.set(r.name, id as number)
    }
  })
}
