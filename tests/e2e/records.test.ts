import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { APIRequestContext, Browser, Page } from 'playwright-core'
import { join } from 'node:path'
import { encodeWav, synth } from '../../server/audio/index.ts'
import { launchBrowser, SHOTS, startProduct } from './browser'
import type { SessionDetail } from '../../shared/schemas/sessions'
import type { Recipe } from '../../shared/schemas/recipes'
import type { Excerpt } from '../../shared/schemas/clips'

let product: Awaited<ReturnType<typeof startProduct>>
let browser: Browser
let used: Used

beforeAll(async () => {
  product = await startProduct()
  browser = await launchBrowser()
  used = await openSessionOnNewSet()
})
afterAll(async () => {
  await browser?.close()
  await product?.stop()
})

/** Page errors, leaving out the browser's own note of the refusals these tests ask for. */
function watchErrors(page: Page): string[] {
  const errors: string[] = []
  page.on('pageerror', (e) => errors.push(e.message))
  page.on('console', (m) => {
    if (m.type() === 'error' && !/status of 409/.test(m.text())) errors.push(m.text())
  })
  return errors
}

async function signIn(page: Page) {
  await page.goto(`${product.base}/`)
  await page.getByLabel('E-mail').fill('developer@ringdown.test')
  await page.getByLabel('Password').fill('ringdown-demo')
  await page.getByRole('button', { name: 'Sign in' }).click()
  await page.getByRole('heading', { name: /^Hello,/ }).waitFor()
}

interface Used {
  sessionId: number
  clipId: number
  recipeId: number
  recipeName: string
}

function wav(seconds = 2) {
  const tone = synth.bowedTone({ f0: 440, seconds, attackSeconds: 0.08, delaySeconds: 0.2 })
  return Buffer.from(encodeWav([tone], 48_000, { bitDepth: 16 }))
}

/** POST /api/clips with a short bowed tone; answers the new clip's id. */
async function upload(api: APIRequestContext, recipeId: number, excerptId: number, code: string) {
  const res = await api.post(`${product.base}/api/clips`, {
    multipart: {
      recipeId: String(recipeId),
      excerptId: String(excerptId),
      performerCode: code,
      instrumentCode: 'VN-21',
      kind: 'bowed',
      file: { name: `${code}-${recipeId}.wav`, mimeType: 'audio/wav', buffer: wav() },
    },
  })
  expect(res.status()).toBe(201)
  return ((await res.json()) as { clip: { id: number } }).clip.id
}

async function signedInApi() {
  const context = await browser.newContext()
  const login = await context.request.post(`${product.base}/api/auth/login`, {
    data: { email: 'developer@ringdown.test', password: 'ringdown-demo' },
  })
  expect(login.ok()).toBe(true)
  return context
}

/**
 * An opened session over a matched set recorded for it (the browser tests run without the demo
 * clips and sessions): its clips and recipes are then used, and frozen.
 */
async function openSessionOnNewSet(): Promise<Used> {
  const context = await signedInApi()
  const api = context.request
  const { recipes } = (await (await api.get(`${product.base}/api/recipes`)).json()) as {
    recipes: Recipe[]
  }
  const { excerpts } = (await (await api.get(`${product.base}/api/excerpts`)).json()) as {
    excerpts: Excerpt[]
  }
  const violinA = recipes.filter((r) => r.instrument === 'violin' && r.stringName === 'A')
  const pair = violinA.slice(0, 2)
  expect(pair).toHaveLength(2)
  const excerptId = excerpts.find((e) => e.active)!.id
  const clipIds = [
    await upload(api, pair[0].id, excerptId, 'PF-21'),
    await upload(api, pair[1].id, excerptId, 'PF-21'),
  ]
  const deadline = new Date(Date.now() + 14 * 86_400_000).toISOString().slice(0, 10)
  const created = await api.post(`${product.base}/api/sessions`, {
    data: {
      name: 'Record keeping check',
      playerTitle: 'Listening session',
      format: 'rating',
      recipeIds: pair.map((r) => r.id),
      clipSets: [{ key: 'record-check', clipIds }],
      deadline,
    },
  })
  expect(created.status()).toBe(201)
  const { session } = (await created.json()) as { session: SessionDetail }
  const opened = await api.post(`${product.base}/api/sessions/${session.id}/open`, {
    data: { acceptSameTake: true },
  })
  expect(opened.ok()).toBe(true)
  await context.close()
  return {
    sessionId: session.id,
    clipId: clipIds[1],
    recipeId: pair[0].id,
    recipeName: pair[0].name,
  }
}

/** Archive, restore and delete wait under the row's "More" menu. */
async function fromMenu(page: Page, label: string, action: string) {
  await page.getByRole('button', { name: `More for ${label}` }).click()
  await page.locator('.n-dropdown-option-body', { hasText: action }).click()
}

async function openClips(page: Page) {
  await page.getByRole('link', { name: 'Clips', exact: true }).first().click()
  await page.locator('[data-test=clips-table] tbody tr').first().waitFor()
}

describe('a developer keeping the record', () => {
  it('is refused deleting a clip a session plays, archives it instead and sees it leave the list', async () => {
    const page = await browser.newPage({ viewport: { width: 1440, height: 900 } })
    const errors = watchErrors(page)
    await signIn(page)
    const { clipId, sessionId } = used
    await openClips(page)

    const row = page.locator(`[data-test=clip-${clipId}]`)
    await fromMenu(page, `Clip ${clipId}`, 'Delete…')
    await page.getByRole('button', { name: 'Delete for good' }).click()
    const refused = page.locator('[data-test=delete-refused]')
    await refused.waitFor()
    expect(await refused.textContent()).toContain('archive it instead of deleting it')
    await page.screenshot({ path: join(SHOTS, 'records-clip-refused.png') })

    await page.getByRole('button', { name: 'Archive instead' }).click()
    await page.getByText(`Clip ${clipId} archived`).waitFor()
    await row.waitFor({ state: 'detached' })

    // Asked for, it is there, marked, and can be restored.
    await page.locator('[data-test=archived-filter]').click()
    await page.locator('.n-base-select-option').getByText('Only archived', { exact: true }).click()
    await row.waitFor()
    expect(await row.textContent()).toContain('Archived')
    await page.getByRole('button', { name: `More for Clip ${clipId}` }).click()
    await page.locator('.n-dropdown-option-body', { hasText: 'Restore' }).waitFor()
    await page.screenshot({ path: join(SHOTS, 'records-clips-archived.png') })
    await page.keyboard.press('Escape')

    // The session that plays it keeps it, marked as archived.
    await page.goto(`${product.base}/sessions/${sessionId}`)
    await page.locator('.n-alert', { hasText: `clip ${clipId} is archived` }).waitFor()
    // Open, so its design shows in the picker: the set stays chosen, the clip marked archived.
    await page.getByText(`Archived: clip ${clipId}`).waitFor()
    await page.screenshot({ path: join(SHOTS, 'records-session-archived-clip.png') })
    expect(errors).toEqual([])
  }, 60_000)

  it('still deletes a clip nothing uses', async () => {
    const page = await browser.newPage({ viewport: { width: 1440, height: 900 } })
    await signIn(page)
    const context = await signedInApi()
    const { recipes } = (await (
      await context.request.get(`${product.base}/api/recipes`)
    ).json()) as {
      recipes: Recipe[]
    }
    const { excerpts } = (await (
      await context.request.get(`${product.base}/api/excerpts`)
    ).json()) as { excerpts: Excerpt[] }
    const spare = await upload(
      context.request,
      recipes[0].id,
      excerpts.find((e) => e.active)!.id,
      'PF-29',
    )
    await context.close()
    const clip = { id: spare }

    await openClips(page)
    const row = page.locator(`[data-test=clip-${clip.id}]`)
    await fromMenu(page, `Clip ${clip.id}`, 'Delete…')
    await page.getByRole('button', { name: 'Delete for good' }).click()
    await page.getByText(`Clip ${clip.id} deleted`).waitFor()
    await row.waitFor({ state: 'detached' })
  }, 60_000)

  it('turns a refused change of a used recipe into a new version', async () => {
    const page = await browser.newPage({ viewport: { width: 1440, height: 900 } })
    const errors = watchErrors(page)
    await signIn(page)
    await page.getByRole('link', { name: 'Recipes', exact: true }).first().click()
    const row = page.locator(`[data-test=recipe-${used.recipeId}]`)
    await row.getByRole('button', { name: 'Edit' }).click()
    const dialog = page.getByRole('dialog')
    const core = dialog
      .locator('.n-form-item')
      .filter({ has: page.locator('.n-form-item-label', { hasText: /^Core/ }) })
    // Any core but the one the recipe has is a change of construction.
    const current = (await core.locator('.n-base-selection').textContent())?.trim()
    const other = current === 'gut' ? 'solid steel' : 'gut'
    await core.locator('.n-base-selection').click()
    await page.locator('.n-base-select-option').getByText(other, { exact: true }).click()
    await dialog.getByRole('button', { name: 'Save changes' }).click()

    const refusal = dialog.locator('[data-test=recipe-save-error]')
    await refusal.waitFor()
    expect(await refusal.textContent()).toContain('its construction cannot change')
    expect(await core.textContent()).toContain('Frozen: used by a session that has opened')
    await page.screenshot({ path: join(SHOTS, 'records-recipe-refused.png') })

    await dialog.getByRole('button', { name: 'Make a new version instead' }).click()
    await dialog.getByRole('button', { name: 'Create the new version' }).click()
    await dialog.waitFor({ state: 'hidden' })
    const v2 = page.locator('[data-test=recipes-table] tbody tr', {
      hasText: `${used.recipeName} v2`,
    })
    await v2.waitFor()
    expect(await v2.textContent()).toContain(`from ${used.recipeName} v1`)
    expect(await v2.textContent()).toContain(other)
    // The original keeps the construction its session was designed with.
    expect(await row.textContent()).toContain(current)
    expect(errors).toEqual([])
  }, 60_000)
})
