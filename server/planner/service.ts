import type { Knex } from 'knex'
import {
  playersForDifference,
  playersForPreference,
  playersForTriangle,
  triangleCriterion,
} from '../design/index.ts'
import type { PlannerParams, PlannerResult } from '../../shared/schemas/sessions'

/** The three sample-size answers side by side with the panel there is to draw on. */
export async function plannerNumbers(knex: Knex, q: PlannerParams): Promise<PlannerResult> {
  const [{ n }] = (await knex('players').where({ status: 'active' }).count({ n: '*' })) as {
    n: number
  }[]
  const panelSize = Number(n)
  const { alpha, power } = q
  const pairedT = playersForDifference({ difference: q.difference, sd: q.sd, alpha, power })
  const signTest = playersForPreference({ share: q.share, alpha, power })
  const triangle = playersForTriangle({ pd: q.pd, alpha, power })
  const answers = q.n ?? panelSize
  return {
    pairedT: { players: pairedT.n, power: pairedT.power },
    signTest: { players: signTest.n, power: signTest.power },
    triangle: {
      players: triangle.n,
      power: triangle.power,
      minimumCorrect: answers > 0 ? triangleCriterion(answers, alpha) : null,
      answers,
    },
    panelSize,
  }
}
