import type { AppContext } from '../../server/context'
import type { Actor } from '../../server/audit/service'
import { DEMO_STAFF } from '../../server/auth/demoAccounts'
import { createRecipe } from '../../server/recipes/service'
import { createRecipeBody } from '../../shared/schemas/recipes'

/*
 * Demo recipes of the invented maker Larchmere String Works: a violin A string in four damping
 * treatments, and a cello D string wound with round or flat wire. Made through the recipe
 * service, as a developer would, each later version naming the one it came from.
 */

type Layer = { material: string; profile: 'round' | 'flat'; wireMm: number }
interface DemoRecipe {
  name: string
  instrument: string
  stringName: string
  core: string
  windings: Layer[]
  dampingKind: string
  dampingGrade?: string
  dampingNotes?: string
  gaugeMm: number
  vibratingLengthMm: number
  tensionN: number
  parent?: string
  status: string
  notes: string
}

const aurelWindings: Layer[] = [{ material: 'aluminium', profile: 'flat', wireMm: 0.08 }]

const RECIPES: DemoRecipe[] = [
  {
    name: 'Aurel A bare',
    instrument: 'violin',
    stringName: 'A',
    core: 'synthetic multifilament',
    windings: aurelWindings,
    dampingKind: 'none',
    gaugeMm: 0.62,
    vibratingLengthMm: 328,
    tensionN: 52,
    status: 'prototype',
    notes: 'Reference build: nothing between core and winding.',
  },
  {
    name: 'Aurel A light compound',
    instrument: 'violin',
    stringName: 'A',
    core: 'synthetic multifilament',
    windings: aurelWindings,
    dampingKind: 'compound',
    dampingGrade: 'V-20 (light)',
    dampingNotes: 'Thin bead of viscous compound under the first layer.',
    gaugeMm: 0.63,
    vibratingLengthMm: 328,
    tensionN: 52,
    parent: 'Aurel A bare',
    status: 'prototype',
    notes: 'Aurel A bare with a light compound.',
  },
  {
    name: 'Aurel A heavy compound',
    instrument: 'violin',
    stringName: 'A',
    core: 'synthetic multifilament',
    windings: aurelWindings,
    dampingKind: 'compound',
    dampingGrade: 'V-60 (heavy)',
    dampingNotes: 'Full coat of the stiffer compound.',
    gaugeMm: 0.64,
    vibratingLengthMm: 328,
    tensionN: 52,
    parent: 'Aurel A light compound',
    status: 'prototype',
    notes: 'Expected darker and quicker to speak.',
  },
  {
    name: 'Aurel A fibre wrap',
    instrument: 'violin',
    stringName: 'A',
    core: 'synthetic multifilament',
    windings: [
      { material: 'synthetic fibre', profile: 'flat', wireMm: 0.03 },
      { material: 'aluminium', profile: 'flat', wireMm: 0.08 },
    ],
    dampingKind: 'fibre layer',
    dampingNotes: 'Polyester fibre layer between core and winding.',
    gaugeMm: 0.66,
    vibratingLengthMm: 328,
    tensionN: 52,
    parent: 'Aurel A bare',
    status: 'draft',
    notes: '',
  },
  {
    name: 'Tessel D round',
    instrument: 'cello',
    stringName: 'D',
    core: 'stranded steel',
    windings: [
      { material: 'chrome steel', profile: 'round', wireMm: 0.12 },
      { material: 'chrome steel', profile: 'round', wireMm: 0.1 },
    ],
    dampingKind: 'none',
    gaugeMm: 1.02,
    vibratingLengthMm: 695,
    tensionN: 128,
    status: 'prototype',
    notes: 'Round outer wire.',
  },
  {
    name: 'Tessel D flat',
    instrument: 'cello',
    stringName: 'D',
    core: 'stranded steel',
    windings: [
      { material: 'chrome steel', profile: 'round', wireMm: 0.12 },
      { material: 'chrome steel', profile: 'flat', wireMm: 0.1 },
    ],
    dampingKind: 'none',
    gaugeMm: 1.0,
    vibratingLengthMm: 695,
    tensionN: 128,
    parent: 'Tessel D round',
    status: 'prototype',
    notes: 'Flat outer wire: smoother under the bow, expected a little more damped.',
  },
]

/** Adds the demo recipes once; a catalogue that already has them is left alone. */
export async function seedDemoRecipes(ctx: AppContext): Promise<void> {
  if (await ctx.knex('recipes').where({ name: RECIPES[0].name }).first('id')) return
  const developer: { id: number; email: string } | undefined = await ctx
    .knex('users')
    .where({ email: DEMO_STAFF[1].email })
    .first('id', 'email')
  const actor: Actor = { userId: developer?.id ?? null, email: developer?.email ?? null }
  const ids = new Map<string, number>()
  for (const { parent, ...r } of RECIPES) {
    // Checked as a developer's form would be: demo data meets the same rules.
    const body = createRecipeBody.parse({
      ...r,
      parentId: parent ? (ids.get(parent) ?? null) : null,
    })
    const recipe = await createRecipe(ctx, body, actor)
    ids.set(r.name, recipe.id)
  }
}
