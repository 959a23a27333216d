import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import { join } from 'node:path'
import type { PlayerPlanView, PlayerState } from '../../shared/schemas/rating'
import { launchBrowser, SHOTS, startProduct } from './browser'
import { invitedStudy } from './playerFixture'
import { passChecksByApi } from './checksByApi'

let product: Awaited<ReturnType<typeof startProduct>>
let browser: Browser

beforeAll(async () => {
  product = await startProduct()
  browser = await launchBrowser()
})
afterAll(async () => {
  await browser?.close()
  await product?.stop()
})

const PHONE = { width: 390, height: 844 }
const DESKTOP = { width: 1280, height: 900 }

/** Waits for the trial's audio to be ready; on a timeout, says what the page showed instead. */
async function deckReady(page: Page) {
  try {
    await page.locator('[data-test=play]').waitFor({ timeout: 20_000 })
  } catch (err) {
    throw new Error(`No playable deck; the page showed: ${await page.textContent('main')}`, {
      cause: err,
    })
  }
}

function watchErrors(page: Page): string[] {
  const errors: string[] = []
  page.on('pageerror', (e) => errors.push(e.message))
  page.on('console', (m) => m.type() === 'error' && errors.push(m.text()))
  return errors
}

/** A page where the headphone check shows its right answers (test mode only). */
async function playerPage(viewport: { width: number; height: number }) {
  const page = await browser.newPage({ viewport, hasTouch: viewport.width < 500 })
  await page.addInitScript("localStorage.setItem('ringdown.test', '1')")
  return page
}

async function headphoneCheck(page: Page, rightAnswers: boolean, playFirst: boolean) {
  await page.getByRole('button', { name: /Start the check|Try the check again/ }).click()
  for (let i = 0; i < 6; i++) {
    const trial = page.locator('[data-test=headphone-trial]')
    await trial.getByText(`Tone set ${i + 1} of 6`).waitFor()
    if (playFirst && i === 0) {
      await page.getByRole('button', { name: 'Play the three tones' }).click()
      await page.getByRole('button', { name: 'Play the tones again' }).waitFor({ timeout: 10_000 })
    }
    const answer = Number(await trial.getAttribute('data-answer'))
    const pick = rightAnswers ? answer : (answer + 1) % 3
    await trial.getByLabel(`Tone ${pick + 1}`).check()
    await trial.getByRole('button', { name: i < 5 ? 'Next' : 'Finish the check' }).click()
  }
}

const valueFor = (trialIndex: number, attr: number) => (trialIndex * 17 + attr * 29 + 5) % 101

describe('a player on a phone', () => {
  it('opens the invitation, passes the checks, rates every trial, resumes after a reload and finishes', async () => {
    const study = await invitedStudy(product.base, product.mailbox, {
      format: 'rating',
      name: 'Aurel A in the browser: brightness, response, warmth',
    })
    const token = study.link.split('/p/')[1]
    const page = await playerPage(PHONE)
    const errors = watchErrors(page)
    await page.goto(study.link.replace(/^https?:\/\/[^/]+/, product.base))

    await page.getByRole('heading', { name: /^Welcome/ }).waitFor()
    // The player title heads the page; the staff name (which names the recipes) never shows.
    expect(await page.textContent('[data-test=player-title]')).toBe(study.playerTitle)
    expect(await page.textContent('body')).not.toContain('Aurel A in the browser')
    await page.screenshot({ path: join(SHOTS, 'player-phone-welcome.png'), fullPage: true })
    const begin = page.getByRole('button', { name: 'Agree and begin' })
    expect(await begin.isDisabled()).toBe(true)
    await page.getByLabel('I agree that my ratings may be used in this way.').check()
    await begin.click()

    // A failed check explains itself and offers another go after a pause the server keeps.
    await page.getByRole('heading', { name: 'Headphone check' }).waitFor()
    await headphoneCheck(page, false, false)
    await page.locator('[data-test=headphone-failed]').waitFor()
    const countdown = page.locator('[data-test=headphone-countdown]')
    expect(await countdown.textContent()).toMatch(/You can try again in (30|29) seconds/)
    const retry = page.getByRole('button', { name: 'Try the check again' })
    expect(await retry.isDisabled()).toBe(true)
    await page.screenshot({
      path: join(SHOTS, 'player-phone-headphone-failed.png'),
      fullPage: true,
    })
    // Rather than wait the pause out, the server's clock moves past it; the reopened page
    // hears from the server that the retry is open.
    product.skipAhead(30_000)
    await page.reload()
    await countdown.getByText('You can try again now.').waitFor()
    await headphoneCheck(page, true, true)

    await page.getByRole('heading', { name: 'Set a comfortable level' }).waitFor()
    expect(await page.textContent('main')).toContain('Start quiet')
    const levelPlay = page.locator('[data-test=level-play]')
    await expect.poll(() => levelPlay.textContent()).toContain('Play the level sample')
    await levelPlay.click()
    await expect.poll(() => levelPlay.textContent()).toContain('Pause')
    await page.screenshot({ path: join(SHOTS, 'player-phone-level.png'), fullPage: true })
    await page.getByRole('button', { name: 'The level is comfortable — continue' }).click()

    const plan = (await page.evaluate(
      (t) =>
        fetch(`/api/player/plan`, { headers: { 'X-Invitation-Token': t } }).then((r) => r.json()),
      token,
    )) as { plan: PlayerPlanView }
    const keys = plan.plan.attributes.map((a) => a.key)
    const trialOfCode = new Map<number, number[]>()
    for (const t of plan.plan.trials) {
      const list = trialOfCode.get(t.clips[0].code) ?? []
      list.push(t.index)
      trialOfCode.set(t.clips[0].code, list)
    }
    const screens = new Set(plan.plan.trials.map((t) => t.screen)).size
    expect(screens).toBeGreaterThan(1)
    const expected = new Map<number, Record<string, number>>()

    async function rateScreen(n: number) {
      await page.getByRole('heading', { name: `Page ${n} of ${screens}` }).waitFor()
      await deckReady(page)
      const shownTrials = plan.plan.trials.filter(
        (t) => t.screen === plan.plan.trials.find((x) => !expected.has(x.index))!.screen,
      )
      for (const t of shownTrials) {
        const card = page.locator(`[data-test=rate-${t.clips[0].code}]`)
        const values: Record<string, number> = {}
        for (const [a, key] of keys.entries()) {
          const input = card.locator(`input[data-attribute=${key}]`)
          if (n === 1 && t === shownTrials[0] && a === 0) {
            // A fresh scale's thumb sits at the middle: a tap right there must still record.
            const box = (await input.boundingBox())!
            await page.mouse.click(box.x + box.width / 2, box.y + box.height / 2)
            await card.locator(`.scale:not(.unset) input[data-attribute=${key}]`).waitFor()
            values[key] = Number(await input.inputValue())
            expect(Math.abs(values[key] - 50)).toBeLessThanOrEqual(2)
            continue
          }
          values[key] = valueFor(t.index, a)
          await input.fill(String(values[key]))
        }
        expected.set(t.index, values)
      }
      return shownTrials
    }

    // First screen: switch by key and by button, play and pause with space.
    const first = await rateScreen(1)
    if (first.length > 1) {
      await page.keyboard.press('2')
      const second = page.locator(`[data-test=switch-${first[1].clips[0].code}]`)
      expect(await second.getAttribute('aria-pressed')).toBe('true')
    }
    await page.locator('body').click({ position: { x: 5, y: 5 } })
    await page.keyboard.press(' ')
    await expect.poll(() => page.locator('[data-test=play]').textContent()).toContain('Pause')
    // The playhead follows the engine's clock.
    const time = page.locator('[data-test=time]')
    await expect.poll(() => time.textContent()).not.toMatch(/^0:00\.0 /)
    await page.screenshot({ path: join(SHOTS, 'player-phone-rating.png'), fullPage: true })
    await page.keyboard.press(' ')
    await expect
      .poll(() => page.locator('[data-test=save-status]').textContent())
      .toContain('Saved')
    await page.getByRole('button', { name: /^(Next|Finish)$/ }).click()

    // Half-way: the page is reloaded and resumes at the first screen still to answer.
    await page.reload()
    await page.getByRole('heading', { name: `Page 2 of ${screens}` }).waitFor()
    expect(await page.locator('[data-test=progress]').textContent()).toContain(
      `${first.length} of ${plan.plan.trials.length} answered`,
    )
    for (let n = 2; n <= screens; n++) {
      await rateScreen(n)
      await page.getByRole('button', { name: n < screens ? 'Next' : 'Finish' }).click()
    }
    await page.getByRole('heading', { name: 'Thank you' }).waitFor()
    await expect
      .poll(() => page.locator('[data-test=save-status]').textContent())
      .toContain('Saved')
    await page.screenshot({ path: join(SHOTS, 'player-phone-thanks.png'), fullPage: true })

    // What the server stored is exactly what was moved, one answer per trial.
    const state = (await page.evaluate(
      (t) =>
        fetch(`/api/player/state`, { headers: { 'X-Invitation-Token': t } }).then((r) => r.json()),
      token,
    )) as PlayerState
    const stored = new Map(state.answers.map((a) => [a.trialIndex, a.answer]))
    expect(stored.size).toBe(plan.plan.trials.length)
    for (const [index, values] of expected) {
      expect(stored.get(index)).toEqual({ kind: 'rating', values })
    }
    expect(errors).toEqual([])
    await page.close()

    // The same link on a desktop, going back over the answers.
    const desk = await playerPage(DESKTOP)
    await desk.goto(`${product.base}/p/${token}`)
    await desk.getByRole('heading', { name: 'Thank you' }).waitFor()
    await desk.getByRole('button', { name: 'Go back over your answers' }).click()
    await deckReady(desk)
    await desk.waitForTimeout(300)
    await desk.screenshot({ path: join(SHOTS, 'player-desktop-rating.png'), fullPage: true })
    await desk.close()
  })
})

describe('a pair-preference player on a desktop', () => {
  it('answers by preference and attribute, and is stopped with a reason once the session closes', async () => {
    const study = await invitedStudy(product.base, product.mailbox, {
      format: 'pair',
      name: 'Aurel A pairs in the browser',
      duplicates: 0,
      allowNoPreference: true,
    })
    const token = study.link.split('/p/')[1]
    await passChecksByApi(product.base, token)
    const page = await playerPage(DESKTOP)
    const errors = watchErrors(page)
    await page.goto(`${product.base}/p/${token}`)
    await deckReady(page)
    const plan = (await page.evaluate(
      (t) =>
        fetch(`/api/player/plan`, { headers: { 'X-Invitation-Token': t } }).then((r) => r.json()),
      token,
    )) as { plan: PlayerPlanView }
    const first = plan.plan.trials[0]
    const [a, b] = first.clips.map((c) => c.code)

    await page.locator('[data-test=preference]').getByLabel('No preference').check()
    for (const attr of plan.plan.attributes)
      await page.locator(`[data-test=more-${attr.key}]`).getByLabel(`B ${b}`).check()
    await page.keyboard.press('2')
    expect(await page.locator(`[data-test=switch-${b}]`).getAttribute('aria-pressed')).toBe('true')
    expect(await page.locator(`[data-test=switch-${a}]`).getAttribute('aria-pressed')).toBe('false')
    await expect
      .poll(() => page.locator('[data-test=save-status]').textContent())
      .toContain('Saved')
    await page.screenshot({ path: join(SHOTS, 'player-desktop-pair.png'), fullPage: true })

    // Offline: the change waits on the device, the status says so, and it goes out on return.
    await page.context().setOffline(true)
    await page.locator('[data-test=preference]').getByLabel(`A ${a}`).check()
    await expect
      .poll(() => page.locator('[data-test=save-status]').textContent())
      .toContain('Offline — 1 answer waiting')
    await page.screenshot({ path: join(SHOTS, 'player-desktop-offline.png') })
    await page.context().setOffline(false)
    await expect
      .poll(() => page.locator('[data-test=save-status]').textContent())
      .toContain('Saved')
    const more = Object.fromEntries(plan.plan.attributes.map((x) => [x.key, b]))
    const state = (await page.evaluate(
      (t) =>
        fetch(`/api/player/state`, { headers: { 'X-Invitation-Token': t } }).then((r) => r.json()),
      token,
    )) as PlayerState
    expect(state.answers).toEqual([
      { trialIndex: first.index, answer: { kind: 'pair', preferred: a, more } },
    ])
    await page.getByRole('button', { name: 'Next' }).click()

    await study.staff.send('POST', `/sessions/${study.sessionId}/close`)
    const next = plan.plan.trials[1]
    await page.locator('[data-test=preference]').getByLabel(`A ${next.clips[0].code}`).check()
    await page.locator('[data-test=closed]').waitFor()
    expect(await page.locator('[data-test=closed]').textContent()).toContain('can no longer change')
    await page.screenshot({ path: join(SHOTS, 'player-desktop-closed.png') })

    const rows = await study.staff.get<{ invitations: { answered: number }[] }>(
      `/sessions/${study.sessionId}/invitations`,
    )
    expect(rows.invitations[0].answered).toBe(1)
    // The browser logs the refused and offline requests themselves; nothing else may fail.
    expect(errors.filter((e) => !/410|Gone|ERR_INTERNET_DISCONNECTED/.test(e))).toEqual([])
    await page.close()
  })
})

describe('a play-test label', () => {
  it('opens the rating form for its coded set with the string-fitting caution and no audio checks', async () => {
    const study = await invitedStudy(product.base, product.mailbox, {
      format: 'playtest',
      name: 'Aurel A on your own violin, in the browser',
      duplicates: 0,
    })
    const token = study.link.split('/p/')[1]
    const sheet = await study.staff.get<{
      players: { sets: { code: number; url: string }[] }[]
    }>(`/sessions/${study.sessionId}/labels`)
    const set = sheet.players[0].sets[1]
    const page = await playerPage(PHONE)
    const errors = watchErrors(page)
    await page.goto(set.url.replace(/^https?:\/\/[^/]+/, product.base))
    await page.getByLabel('I agree that my ratings may be used in this way.').check()
    await page.getByRole('button', { name: 'Agree and begin' }).click()
    await page.getByRole('heading', { name: `Rate set ${set.code}` }).waitFor()
    expect(await page.textContent('main')).toContain('wear eye protection')
    const values: Record<string, number> = {}
    for (const [i, input] of (await page.locator('input[type=range]').all()).entries()) {
      const key = (await input.getAttribute('data-attribute'))!
      values[key] = 20 + i * 25
      await input.fill(String(values[key]))
    }
    await page.locator('[data-test=comment]').fill('Speaks quickly; a little edgy on the E.')
    await expect
      .poll(() => page.locator('[data-test=save-status]').textContent())
      .toContain('Saved')
    await page.screenshot({ path: join(SHOTS, 'player-phone-playtest.png'), fullPage: true })
    await page.getByRole('button', { name: 'Finish' }).click()
    await page.getByText(`is rated`).waitFor()

    const state = (await page.evaluate(
      (t) =>
        fetch(`/api/player/state`, { headers: { 'X-Invitation-Token': t } }).then((r) => r.json()),
      token,
    )) as PlayerState
    const plan = (await page.evaluate(
      (t) =>
        fetch(`/api/player/plan`, { headers: { 'X-Invitation-Token': t } }).then((r) => r.json()),
      token,
    )) as { plan: PlayerPlanView }
    const index = plan.plan.trials.find((t) => t.setCode === set.code)!.index
    expect(state.answers).toEqual([
      {
        trialIndex: index,
        answer: { kind: 'playtest', values, comment: 'Speaks quickly; a little edgy on the E.' },
      },
    ])
    expect(errors).toEqual([])
    await page.close()
  })
})

describe('a broken link', () => {
  it('shows a plain refusal and no data', async () => {
    const page = await browser.newPage({ viewport: PHONE })
    await page.goto(`${product.base}/p/not-a-real-token`)
    await page.getByRole('heading', { name: 'This link cannot be used' }).waitFor()
    expect(await page.locator('[data-test=problem]').textContent()).toMatch(/not valid/)
    await page.screenshot({ path: join(SHOTS, 'player-phone-bad-link.png') })
    await page.close()
  })
})
