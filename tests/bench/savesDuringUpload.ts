import { mkdtempSync, rmSync, writeFileSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import request from 'supertest'
import { encodeWav, synth } from '../../server/audio'
import { DEMO_PASSWORD } from '../../server/auth/demoAccounts'
import { createKnex } from '../../server/db/knex'
import { round, type Figure } from './figure'
import { prepareSaves } from './playerSaves'
import { startServer } from './serverProcess'
import { openLoopSaves, p99 } from './openLoopSaves'

const PORT = 3923
const RATE = 48_000
const SECONDS = 600
// Players whose saves are timed on the quiet server, and while the take is uploaded: every
// save is a player's first answer to a trial (the write an answer really costs) until they run
// out, then the same answers again (checked, not written).
const QUIET_SAVERS = 300
const BUSY_SAVERS = 600
const QUIET_SECONDS = 10
// A 1,000-player panel with everyone answering a trial every five seconds: our own estimate of
// a busy evening, not a figure from elsewhere.
const SAVES_PER_SECOND = 200

/**
 * What players saving answers see while staff upload the longest take allowed (ten minutes,
 * 48 kHz stereo 24-bit, 165 MB): answer-save p99 on a quiet server, then from the first byte of
 * the upload until its answer (sent, measured, stored and rendered). The real server in its own
 * process, with its default worker threads; BENCH_WORKER_THREADS=0 runs the clip work on the
 * main thread instead, for comparison.
 */
export async function savesDuringUploadFigures(): Promise<Figure[]> {
  const dir = mkdtempSync(join(tmpdir(), 'ringdown-bench-saves-upload-'))
  const databaseFile = join(dir, 'bench.sqlite')
  const mediaDir = join(dir, 'media')
  const take = join(dir, 'take.wav')
  const short = join(dir, 'short.wav')
  {
    const left = synth.bowedTone({
      sampleRate: RATE,
      seconds: SECONDS,
      f0: 196,
      attackSeconds: 0.08,
    })
    const right = left.map((x) => 0.8 * x)
    writeFileSync(take, encodeWav([left, right], RATE, { bitDepth: 24 }))
    writeFileSync(short, encodeWav([left.subarray(0, 3 * RATE)], RATE, { bitDepth: 16 }))
  }
  const threads = process.env.BENCH_WORKER_THREADS
  const server = await startServer({
    port: PORT,
    databaseFile,
    mediaDir,
    env: threads === undefined ? {} : { WORKER_THREADS: threads },
  })
  const knex = createKnex(databaseFile)
  try {
    const developer = request.agent(server.base)
    await developer
      .post('/api/auth/login')
      .send({ email: 'developer@ringdown.test', password: DEMO_PASSWORD })
    const warmSaves = await prepareSaves(server.base, knex, developer, 20, 'Warm-up saves')
    const quietSaves = await prepareSaves(server.base, knex, developer, QUIET_SAVERS, 'Quiet saves')
    const busySaves = await prepareSaves(server.base, knex, developer, BUSY_SAVERS, 'Busy saves')
    const now = new Date().toISOString()
    const [recipeId] = await knex('recipes').insert({
      name: 'Bench upload plain',
      instrument: 'violin',
      string_name: 'A',
      core: 'synthetic multifilament',
      vibrating_length_mm: 328,
      created_at: now,
      updated_at: now,
    })
    const [excerpt] = (await developer.get('/api/excerpts')).body.excerpts as { id: number }[]
    const send = (path: string, performer: string) =>
      developer
        .post('/api/clips')
        .field('recipeId', String(recipeId))
        .field('excerptId', String(excerpt.id))
        .field('performerCode', performer)
        .field('instrumentCode', 'VN-1')
        .field('kind', 'bowed')
        .attach('file', path)

    const saves = async (bodies: { path: string; body: string }[], seconds: number) => {
      const run = openLoopSaves(server.base, bodies, SAVES_PER_SECOND)
      await new Promise((r) => setTimeout(r, seconds * 1000))
      return run.stop()
    }

    // The code an upload and a save run is loaded and compiled before anything is timed.
    const warm = await send(short, 'BS-0')
    if (warm.status !== 201) throw new Error(`warm-up upload: ${warm.status}`)
    await saves(warmSaves.bodies, 2)

    const quiet = await saves(quietSaves.bodies, QUIET_SECONDS)

    // Saves go on from before the first byte of the upload until its answer has come.
    const during = openLoopSaves(server.base, busySaves.bodies, SAVES_PER_SECOND)
    const started = performance.now()
    const uploaded = await send(take, 'BS-1')
    const uploadMs = performance.now() - started
    const busy = await during.stop()
    if (uploaded.status !== 201)
      throw new Error(`upload: ${uploaded.status} ${JSON.stringify(uploaded.body)}`)

    const label = `${SAVES_PER_SECOND} saves/s, ${SECONDS / 60}-minute 48 kHz stereo 24-bit WAV`
    const firstOf = (r: { latencies: number[] }, bodies: unknown[]) =>
      `${r.latencies.length} saves, ${Math.min(r.latencies.length, bodies.length)} of them first answers`
    return [
      {
        name: `answer-save p99, quiet (${label}; ${firstOf(quiet, quietSaves.bodies)})`,
        value: round(p99(quiet), 1),
        unit: 'ms',
        target: '< 50',
        better: 'lower',
      },
      {
        name: `answer-save p99 while the take is uploaded, measured and rendered (${firstOf(busy, busySaves.bodies)})`,
        value: round(p99(busy), 1),
        unit: 'ms',
        target: '< 50',
        better: 'lower',
      },
      {
        name: 'answer-save longest while the take is uploaded, measured and rendered',
        value: round(Math.max(...busy.latencies), 1),
        unit: 'ms',
        target: 'none: a stop of the main thread shows here whole',
        better: 'lower',
      },
      {
        name: 'upload of the ten-minute take, first byte to answer',
        value: round(uploadMs),
        unit: 'ms',
        target: 'none: for reading beside the saves',
        better: 'lower',
      },
      {
        name: 'answer saves refused or failed, quiet and during the upload',
        value: quiet.failed + busy.failed,
        unit: 'saves',
        target: '0',
        better: 'lower',
      },
    ]
  } finally {
    await server.stop()
    await knex.destroy()
    rmSync(dir, { recursive: true, force: true })
  }
}
