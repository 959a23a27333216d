import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import { join } from 'node:path'
import { encodeWav, synth } from '../../server/audio/index.ts'
import { launchBrowser, SHOTS, startProduct } from './browser'

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

function watchErrors(page: Page): string[] {
  const errors: string[] = []
  page.on('pageerror', (e) => errors.push(e.message))
  page.on('console', (m) => m.type() === 'error' && errors.push(m.text()))
  return errors
}

async function pick(page: Page, select: string, option: string) {
  await page.locator(`[data-test=${select}]`).click()
  await page.locator('.n-base-select-option').getByText(option, { exact: true }).click()
}

describe('a developer in the browser', () => {
  it('uploads a recording, watches it go through, finds it measured and listens to it', async () => {
    const page = await browser.newPage({ viewport: { width: 1280, height: 900 } })
    const errors = watchErrors(page)
    await page.goto(`${product.base}/`)
    await page.getByLabel('E-mail').fill('developer@ringdown.test')
    await page.getByLabel('Password').fill('ringdown-demo')
    await page.getByRole('button', { name: 'Sign in' }).click()
    await page.getByRole('link', { name: 'Clips', exact: true }).first().click()
    await page.getByRole('heading', { name: 'Clips' }).waitFor()

    await page.getByRole('button', { name: 'Upload clips…' }).click()
    const dialog = page.getByRole('dialog')
    const tone = synth.bowedTone({ f0: 440, seconds: 4, attackSeconds: 0.08, delaySeconds: 0.2 })
    await dialog.locator('[data-test=clip-files]').setInputFiles({
      name: 'cellar-take-07.wav',
      mimeType: 'audio/wav',
      buffer: Buffer.from(encodeWav([tone], 48_000, { bitDepth: 24 })),
    })
    await dialog.getByText('cellar-take-07.wav').waitFor()
    await pick(page, 'recipe', 'Aurel A bare (v1, violin A)')
    await pick(page, 'excerpt', 'open string')
    await dialog.getByPlaceholder('e.g. PF-07').fill('pf-07')
    await dialog.getByPlaceholder('e.g. VN-9').fill('VN-3')
    await dialog.getByRole('button', { name: 'Upload 1 file' }).click()

    const state = dialog.locator('[data-test=upload-state]')
    await expect.poll(() => state.textContent(), { timeout: 15_000 }).toContain('Done')
    expect(await dialog.locator('[data-test=upload-list]').textContent()).toMatch(
      /rendition at -23\.0 LUFS/,
    )
    await page.screenshot({ path: join(SHOTS, 'clips-upload.png') })
    await dialog.getByRole('button', { name: 'Close', exact: true }).click()
    await dialog.waitFor({ state: 'hidden' })

    const row = page.locator('[data-test=clips-table] tbody tr', { hasText: 'PF-07' })
    await row.waitFor()
    expect(await row.textContent()).toMatch(/Aurel A bare v1.*LUFS/)
    await row.getByRole('button', { name: 'Listen ▶' }).click()
    const preview = page.locator('[data-test=clip-preview]')
    await preview.waitFor()
    // The waveform is drawn on canvases inside the player's shadow root.
    const canvases = () =>
      preview
        .locator('[data-test=waveform]')
        .evaluate((el) => el.firstElementChild?.shadowRoot?.querySelectorAll('canvas').length ?? 0)
    await expect.poll(canvases).toBeGreaterThan(0)
    expect(await preview.textContent()).toContain('Listen at a comfortable, low level')
    await page.waitForTimeout(300)
    await page.screenshot({ path: join(SHOTS, 'clips-preview.png') })

    await page.locator('.n-drawer').getByRole('button', { name: 'close' }).click()
    await preview.waitFor({ state: 'hidden' })
    await page.locator('.n-tabs-tab').getByText('Matched sets', { exact: true }).click()
    await page.locator('[data-test=matched-sets]').getByText('PF-07').waitFor()
    await page.screenshot({ path: join(SHOTS, 'clips-matched-sets.png') })
    expect(errors).toEqual([])
  }, 60_000)

  it('shows an analyst the library without upload buttons', async () => {
    const page = await browser.newPage({ viewport: { width: 1280, height: 800 } })
    await page.goto(`${product.base}/`)
    await page.getByLabel('E-mail').fill('analyst@ringdown.test')
    await page.getByLabel('Password').fill('ringdown-demo')
    await page.getByRole('button', { name: 'Sign in' }).click()
    await page.getByRole('link', { name: 'Clips', exact: true }).first().click()
    await page.locator('[data-test=clips-table] tbody tr', { hasText: 'PF-07' }).waitFor()
    expect(await page.getByRole('button', { name: 'Upload clips…' }).count()).toBe(0)
  }, 30_000)
})
