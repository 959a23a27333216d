import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import { join } from 'node:path'
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

async function signIn(page: Page, email: string) {
  await page.goto(`${product.base}/`)
  await page.getByLabel('E-mail').fill(email)
  await page.getByLabel('Password').fill('ringdown-demo')
  await page.getByRole('button', { name: 'Sign in' }).click()
  await page.getByRole('heading', { name: /^Hello,/ }).waitFor()
}

function watchErrors(page: Page): string[] {
  const errors: string[] = []
  page.on('pageerror', (e) => errors.push(e.message))
  page.on('console', (m) => m.type() === 'error' && errors.push(m.text()))
  return errors
}

describe('an admin in the browser', () => {
  it('adds a player, finds them in the panel, invites a colleague, reads the mail, signs out', async () => {
    const page = await browser.newPage({ viewport: { width: 1280, height: 860 } })
    const errors = watchErrors(page)
    await signIn(page, 'admin@ringdown.test')
    await page.screenshot({ path: join(SHOTS, 'admin-overview.png') })

    await page.getByRole('link', { name: 'Panel', exact: true }).first().click()
    await page.getByRole('button', { name: 'Add player' }).click()
    const dialog = page.getByRole('dialog')
    await dialog.getByLabel('Name', { exact: true }).fill('Rosalind Quenby')
    await dialog.getByLabel('E-mail').fill('rosalind.quenby@players.larchmere.test')
    await dialog.getByText('cello', { exact: true }).click()
    await dialog.locator('[data-test=level]').click()
    await page.locator('.n-base-select-option').getByText('teacher', { exact: true }).click()
    await dialog.getByRole('button', { name: 'Add player' }).click()
    await dialog.waitFor({ state: 'hidden' })

    await page.getByLabel('Search the panel').fill('Quenby')
    const row = page.locator('[data-test=panel-table] tbody tr', { hasText: 'Rosalind Quenby' })
    await row.waitFor()
    expect(await row.textContent()).toContain('cello')
    await page.screenshot({ path: join(SHOTS, 'admin-panel.png') })

    await page.getByRole('link', { name: 'Staff accounts', exact: true }).click()
    await page.getByRole('button', { name: 'Invite a colleague' }).click()
    const invite = page.getByRole('dialog')
    await invite.getByLabel('Name', { exact: true }).fill('Benedikt Arrowsmith')
    await invite.getByLabel('E-mail').fill('benedikt@larchmere.test')
    await invite.getByRole('button', { name: 'Send invitation' }).click()
    await invite.waitFor({ state: 'hidden' })
    await page.getByRole('cell', { name: 'benedikt@larchmere.test' }).waitFor()

    await page.getByRole('link', { name: 'Mail', exact: true }).click()
    await expect
      .poll(async () => {
        await page.getByRole('button', { name: 'Refresh' }).first().click()
        return page.locator('[data-test=mailbox-list]').textContent()
      })
      .toContain('You are invited to Ringdown')
    await page
      .locator('[data-test=mailbox-list] >> text=You are invited to Ringdown')
      .first()
      .click()
    const body = page.locator('[data-test=mail-body]')
    await expect.poll(() => body.textContent()).toContain('Benedikt Arrowsmith')
    const link = await body.locator('a[href*="/set-password#token="]').getAttribute('href')
    expect(link).toBeTruthy()
    await page.screenshot({ path: join(SHOTS, 'admin-mailbox.png') })

    await page.getByRole('link', { name: 'Audit log', exact: true }).click()
    await page.locator('[data-test=audit-table]').getByText('staff.invited').first().waitFor()

    await page.locator('[data-test=account-menu]').click()
    await page.getByText('Sign out').click()
    await page.getByRole('button', { name: 'Sign in' }).waitFor()
    expect(errors).toEqual([])

    // The invited colleague opens the link, chooses a password and lands in the app.
    const colleague = await browser.newPage()
    await colleague.goto(link!)
    await colleague.getByText('Benedikt Arrowsmith (benedikt@larchmere.test)').waitFor()
    await colleague.getByLabel('New password').fill('a long enough secret')
    await colleague.getByLabel('The same password again').fill('a long enough secret')
    await colleague.getByRole('button', { name: 'Save and sign in' }).click()
    await colleague.getByRole('heading', { name: 'Hello, Benedikt' }).waitFor()
    await colleague.close()
    await page.close()
  })
})

describe('an analyst in the browser', () => {
  it('sees no admin entries and is refused the admin pages', async () => {
    const page = await browser.newPage({ viewport: { width: 1280, height: 860 } })
    await signIn(page, 'analyst@ringdown.test')
    expect(await page.getByRole('link', { name: 'Staff accounts', exact: true }).count()).toBe(0)
    expect(await page.getByRole('link', { name: 'Panel', exact: true }).count()).toBe(0)

    await page.goto(`${product.base}/admin/staff`)
    await page.getByText('This page is not open to your role').waitFor()
    await page.screenshot({ path: join(SHOTS, 'analyst-refused.png') })

    // The server refuses on its own, whatever the client shows.
    const status = await page.evaluate(() => fetch('/api/staff').then((r) => r.status))
    expect(status).toBe(403)
    await page.close()
  })
})

describe('a phone-sized screen', () => {
  it('keeps the navigation behind a menu button', async () => {
    const page = await browser.newPage({ viewport: { width: 390, height: 800 } })
    await signIn(page, 'developer@ringdown.test')
    await page.getByRole('button', { name: 'Open navigation' }).click()
    await page.getByRole('link', { name: 'Panel', exact: true }).click()
    await page.locator('[data-test=panel-table]').waitFor()
    await page.screenshot({ path: join(SHOTS, 'developer-phone-panel.png') })
    await page.close()
  })
})
