import { describe, expect, it } from 'vitest'
import type { SessionDesignInput } from '../../../server/design/index.ts'
import { buildSessionPlans, sessionCodes } from '../../../server/formats/index.ts'
import { SESSION_FORMATS, type SessionFormat } from '../../../shared/schemas/sessions'

// The order design pinned for fixed seeds: every player's trials, positions, blind codes and
// hidden repeats, for every format. Sessions opened before served records were kept had their
// records rebuilt from these functions, so a change that moves any of this would reassign
// stored answers to other recordings: it must fail here and come with a migration.

function designOf(format: SessionFormat, seed: string, duplicates: number): SessionDesignInput {
  const recipes = [11, 12, 13, 14]
  return {
    format,
    recipes,
    clipSets:
      format === 'playtest'
        ? []
        : ['scale', 'phrase'].map((excerptKey, s) => ({
            excerptKey,
            clips: recipes.map((recipeId) => ({ recipeId, clipId: 100 * (s + 1) + recipeId })),
          })),
    duplicates,
    seed,
  }
}

describe.each(SESSION_FORMATS)('the %s design', (format) => {
  it('deals the same plans and codes for fixed seeds as when it was pinned', async () => {
    const pinned = ['larch-1', 'larch-2'].flatMap((seed) =>
      [0, 2].map((duplicates) => {
        const input = designOf(format, seed, duplicates)
        return {
          seed,
          duplicates,
          codes: sessionCodes(input).entries,
          plans: buildSessionPlans(input, 13),
        }
      }),
    )
    await expect(JSON.stringify(pinned, null, 1) + '\n').toMatchFileSnapshot(
      `../__snapshots__/designs/${format}.json`,
    )
  })
})
