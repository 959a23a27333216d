import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import request from 'supertest'
import { encodeWav, synth } from '../../server/audio'
import { DEMO_PASSWORD } from '../../server/auth/demoAccounts'
import { createKnex } from '../../server/db/knex'
import { round, type Figure } from './figure'
import { startServer } from './serverProcess'

const PORT = 3919
const RATE = 48_000
const RUNS = 3

/**
 * What one 40 MB upload (24-bit stereo at 48 kHz, about 2.4 minutes) costs the server in memory:
 * the real server in its own process, as `npm start` runs it, the file sent from disk by this
 * process. The server's resident memory is read from Linux's /proc while the upload is decoded,
 * measured, stored and rendered: the peak (VmHWM, reset just before the upload) less what the
 * idle server held just before. Three uploads, each into a matched set of its own; the worst
 * counts.
 */
export async function uploadMemoryFigures(): Promise<Figure[]> {
  if (!existsSync('/proc/self/status')) {
    console.error('upload peak memory: needs the /proc file system (Linux); not measured')
    return []
  }
  const dir = mkdtempSync(join(tmpdir(), 'ringdown-bench-upload-'))
  const seconds = (40 * 2 ** 20) / (6 * RATE)
  const left = synth.bowedTone({ sampleRate: RATE, seconds, f0: 196, attackSeconds: 0.08 })
  const right = left.map((x) => 0.8 * x)
  const big = join(dir, 'take.wav')
  writeFileSync(big, encodeWav([left, right], RATE, { bitDepth: 24 }))
  const small = join(dir, 'short.wav')
  writeFileSync(small, encodeWav([left.subarray(0, 3 * RATE)], RATE, { bitDepth: 16 }))

  const databaseFile = join(dir, 'bench.sqlite')
  const server = await startServer({ port: PORT, databaseFile, mediaDir: join(dir, 'media') })
  const { base } = server
  const pid = server.child.pid!
  const kb = (key: 'VmRSS' | 'VmHWM') =>
    Number(new RegExp(`${key}:\\s+(\\d+)`).exec(readFileSync(`/proc/${pid}/status`, 'utf8'))![1])
  try {
    const knex = createKnex(databaseFile)
    const now = new Date().toISOString()
    const [recipeId] = await knex('recipes').insert({
      name: 'Bench A',
      instrument: 'violin',
      string_name: 'A',
      core: 'synthetic multifilament',
      vibrating_length_mm: 328,
      created_at: now,
      updated_at: now,
    })
    await knex.destroy()
    const staff = request.agent(base)
    await staff
      .post('/api/auth/login')
      .send({ email: 'developer@ringdown.test', password: DEMO_PASSWORD })
    const [excerpt] = (await staff.get('/api/excerpts')).body.excerpts as { id: number }[]
    const send = (path: string, performer: string) =>
      staff
        .post('/api/clips')
        .field('recipeId', String(recipeId))
        .field('excerptId', String(excerpt.id))
        .field('performerCode', performer)
        .field('instrumentCode', 'VN-1')
        .field('kind', 'bowed')
        .attach('file', path)

    // One short upload first, so the code the big one runs is loaded and compiled.
    const warm = await send(small, 'BW-1')
    if (warm.status !== 201) throw new Error(`warm-up upload: ${warm.status}`)
    let worst = 0
    for (let run = 1; run <= RUNS; run++) {
      await new Promise((r) => setTimeout(r, 300))
      const idle = kb('VmRSS')
      // Writing 5 resets the peak to the present (Linux ≥ 4.0); sampling covers older kernels.
      let peak = idle
      try {
        writeFileSync(`/proc/${pid}/clear_refs`, '5')
      } catch {
        // The sampled peak below stands alone.
      }
      const sampler = setInterval(() => (peak = Math.max(peak, kb('VmRSS'))), 2)
      const res = await send(big, `BU-${run}`)
      clearInterval(sampler)
      peak = Math.max(peak, kb('VmHWM'))
      if (res.status !== 201) throw new Error(`upload: ${res.status} ${JSON.stringify(res.body)}`)
      worst = Math.max(worst, (peak - idle) / 1024)
    }
    return [
      {
        name: 'upload peak memory (40 MB WAV)',
        value: round(worst, 0),
        unit: 'MB',
        target: '<= 160',
        better: 'lower',
      },
    ]
  } finally {
    await server.stop()
    rmSync(dir, { recursive: true, force: true })
  }
}
