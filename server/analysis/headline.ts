import { formatNumber } from './format.ts'
import type { RecipeMean } from './findings.ts'

/*
 * The one sentence an attribute's section opens with: which recipes came out on top and whether
 * the panel tells them apart, read off the means and their compact letters (recipes sharing a
 * letter are not found different after the session's adjustment). The tables say the rest.
 */

export function attributeHeadline(attribute: string, means: readonly RecipeMean[]): string {
  const rated = means
    .filter((m) => m.mean !== null)
    .sort((a, b) => (b.mean as number) - (a.mean as number))
  if (rated.length === 0) return `Nobody has rated ${attribute} yet.`
  if (rated.length === 1) {
    return `Only ${rated[0].name} has been rated on ${attribute} so far (${score(rated[0])}).`
  }
  const top = rated[0]
  const tested = rated.every((m) => m.letters)
  if (!tested) {
    return `${top.name} is rated highest on ${attribute} (${score(top)}), but not every pair could be tested yet.`
  }
  const sharesWithTop = (m: RecipeMean) =>
    [...(m.letters as string)].some((c) => (top.letters as string).includes(c))
  const group = rated.filter(sharesWithTop)
  const lowest = rated[rated.length - 1]
  if (group.length === rated.length) {
    return (
      `No clear differences on ${attribute}: the recipes' means run from ` +
      `${formatNumber(lowest.mean as number)} to ${formatNumber(top.mean as number)}, and no ` +
      `pair differs clearly.`
    )
  }
  if (group.length === 1) {
    return `${top.name} is rated highest on ${attribute} (${score(top)}), clearly above every other recipe.`
  }
  // Only the top recipe is claimed to differ from those outside its group: another member of
  // the group may not differ from them.
  const rest = rated.filter((m) => !sharesWithTop(m))
  const others = rest.length <= 3 ? list(rest.map((m) => m.name)) : `the other ${rest.length}`
  return (
    `${list(group.map((m) => `${m.name} (${score(m)})`))} are rated highest on ${attribute}, ` +
    `and the panel does not tell them apart; ${top.name} is clearly above ${others}.`
  )
}

const score = (m: RecipeMean) => `mean ${formatNumber(m.mean as number)}`

function list(items: string[]): string {
  return items.length <= 2
    ? items.join(' and ')
    : `${items.slice(0, -1).join(', ')} and ${items[items.length - 1]}`
}
