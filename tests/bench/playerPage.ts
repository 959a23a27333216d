import { readFileSync } from 'node:fs'
import { join } from 'node:path'
import { gzipSync } from 'node:zlib'
import { launchBrowser, startProduct } from '../e2e/browser'
import { invitedStudy } from '../e2e/playerFixture'
import { passChecksByApi } from '../e2e/checksByApi'
import { round, type Figure } from './figure'

// The player's page in headless chromium against the built client and the real server: how
// quickly a key press reaches the audio engine, and how much JavaScript a player downloads.

const DIST = join(import.meta.dirname, '../../dist')
const SWITCHES = 60

function percentile(sorted: number[], p: number): number {
  return sorted[Math.min(sorted.length - 1, Math.floor(p * sorted.length))]
}

export async function playerPageFigures(): Promise<Figure[]> {
  // The demo recordings are not needed here; the fixture makes its own.
  process.env.NODE_ENV ??= 'test'
  const product = await startProduct()
  const browser = await launchBrowser()
  try {
    const { link } = await invitedStudy(product.base, product.mailbox, {
      format: 'rating',
      name: 'Switching benchmark',
      duplicates: 0,
    })
    const token = link.split('/p/')[1]
    // Consent and both checks through the API: the benchmark is about the trial screen.
    await passChecksByApi(product.base, token)

    const page = await browser.newPage({ viewport: { width: 1280, height: 900 } })
    await page.addInitScript("localStorage.setItem('ringdown.bench', '1')")
    const scripts = new Set<string>()
    page.on('response', (r) => {
      const url = new URL(r.url())
      if (url.pathname.endsWith('.js')) scripts.add(url.pathname)
    })
    await page.goto(`${product.base}/p/${token}`)
    await page.locator('[data-test=play]').waitFor({ timeout: 20_000 })
    await page.locator('[data-test=waveform] div').first().waitFor()
    await page.locator('[data-test=play]').click()
    await page.waitForTimeout(200)

    const clips = await page.locator('[data-test^=switch-]').count()
    // Every press goes to a clip other than the one heard, as a listener comparing would.
    for (let i = 1; i <= SWITCHES; i++) {
      await page.keyboard.press(String((i % clips) + 1))
      await page.waitForTimeout(20)
    }
    const times = (await page.evaluate('window.__ringdownSwitchTimes ?? []')) as {
      scheduledMs: number
      outputMs: number | null
    }[]
    await page.close()

    const scheduled = times.map((t) => t.scheduledMs).sort((a, b) => a - b)
    const output = times
      .map((t) => t.outputMs)
      .filter((t): t is number => t !== null && t > 0)
      .sort((a, b) => a - b)
    let bytes = 0
    for (const path of scripts) bytes += gzipSync(readFileSync(join(DIST, path))).length

    const figures: Figure[] = [
      {
        name: 'player clip switch, key press to gain ramp scheduled on the audio clock, median',
        value: round(percentile(scheduled, 0.5), 2),
        unit: 'ms',
        target: '< 20',
        better: 'lower',
      },
      {
        name: 'player clip switch, key press to gain ramp scheduled, 95th percentile',
        value: round(percentile(scheduled, 0.95), 2),
        unit: 'ms',
        target: '< 20',
        better: 'lower',
      },
    ]
    if (output.length)
      figures.push({
        // The device's output buffer is added here: the browser's figure, not the engine's.
        name: 'player clip switch, key press to ramp start at the audio output incl. device buffer (browser-reported), median',
        value: round(percentile(output, 0.5), 1),
        unit: 'ms',
        target: 'reported only',
        better: 'lower',
      })
    figures.push({
      name: `player page JavaScript through a trial screen, ${scripts.size} files, gzip`,
      value: round(bytes / 1024, 1),
      unit: 'KB',
      target: '<= 200',
      better: 'lower',
    })
    return figures
  } finally {
    await browser.close()
    await product.stop()
  }
}
