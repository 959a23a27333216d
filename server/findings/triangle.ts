/* Findings of triangle answers: the test on first answers only, and the verdict in words. */
import { formatP, triangleDPrime, triangleTest } from '../analysis/index.ts'
import type { TriangleFindings } from '../../shared/schemas/findings'
import type { ResolvedAnswers } from './answersToRatings'
import { percent } from './wording'

export function triangleFindings(answers: ResolvedAnswers): TriangleFindings {
  const first = answers.triangles.filter((t) => !t.repeat)
  const correct = first.filter((t) => t.correct).length
  const result = triangleTest(correct, first.length)
  const d = triangleDPrime(correct, first.length)
  return {
    ...result,
    dPrime: d.dPrime,
    dPrimeCi: d.ci,
    dPrimeSentence: d.reason === 'no answers' ? '' : d.sentence,
    repeatsSetAside: answers.triangles.length - first.length,
    verdict: triangleVerdict(result),
  }
}

function triangleVerdict(r: ReturnType<typeof triangleTest>): string {
  if (r.p === null || r.pd === null || r.pdCi === null) {
    return 'Not enough data: nobody has picked an odd one out yet.'
  }
  const head = `${r.correct} of ${r.n} answers picked the odd one out (${percent(r.correct / r.n)}; guessing gives 33%)`
  if (r.minimumCorrect05 === null) {
    return `${head}. With only ${r.n} answers even a perfect score would not reach the 0.05 level.`
  }
  const needed = `${r.minimumCorrect05} were needed at the 0.05 level`
  const pd = `an estimated ${percent(r.pd)} of the panel tell them apart (95% CI ${percent(r.pdCi.lower)} to ${percent(r.pdCi.upper)})`
  return r.p <= 0.05
    ? `${head}; ${needed}, so players can hear a difference (p ${formatP(r.p)}): ${pd}.`
    : `${head}; ${needed}, so this panel did not show an audible difference (p ${formatP(r.p)}); ${pd}.`
}
