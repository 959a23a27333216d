import { createWriteStream, mkdtempSync, readdirSync, rmSync } from 'node:fs'
import { tmpdir } from 'node:os'
import { join } from 'node:path'
import { Readable, Transform, Writable } from 'node:stream'
import { pipeline } from 'node:stream/promises'
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest'
import { encodeWav, synth } from '../../server/audio'
import { isOpaqueName, mediaFolders, writeRenditionFile } from '../../server/clips/storage'
import { buildApp, signInAs, type Agent, type TestApp } from './helpers'
import { addRecipe } from './sessionFixtures'

// A full disk in the middle of writing a rendition. ENOSPC is POSIX's "no space left on
// device" (IEEE Std 1003.1, <errno.h>); Node reports it as `code: 'ENOSPC'` on the failed
// write. The disk is played by a stub: a write stream that takes some bytes, then fails.

/** Like a file stream on a disk that fills after `room` bytes: what came before stays written. */
function fillingDisk(path: string, room: number): Writable {
  const file = createWriteStream(path, { flags: 'wx' })
  let taken = 0
  return new Writable({
    write(chunk: Buffer, _e, done) {
      if (taken + chunk.length > room) {
        const err = Object.assign(new Error(`ENOSPC: no space left on device, write`), {
          code: 'ENOSPC',
          syscall: 'write',
        })
        // A careless writer leaves its part behind: the file is closed, not removed.
        return file.end(() => done(err))
      }
      taken += chunk.length
      file.write(chunk, done)
    },
    final(done) {
      file.end(done)
    },
  })
}

function blocksOf(bytes: Uint8Array, size = 4096): Readable {
  return Readable.from(
    Array.from({ length: Math.ceil(bytes.length / size) }, (_, i) =>
      Buffer.from(bytes.subarray(i * size, (i + 1) * size)),
    ),
  )
}

// The clip code's own writer, swapped for one that fills the disk half-way and checks, as it
// writes, that nothing stands under a final rendition name yet.
const disk = vi.hoisted(() => ({
  full: false,
  seenUnderFinalName: [] as string[],
  renditionsDir: '',
}))
vi.mock('../../server/audio/index.ts', async (importOriginal) => {
  const real = await importOriginal<typeof import('../../server/audio/index.ts')>()
  return {
    ...real,
    writeRenditionWavFile: async (
      path: string,
      channels: Float32Array[],
      sampleRate: number,
      options: { bitDepth: 16 | 24; gainDb: number },
    ) => {
      if (!disk.full) return real.writeRenditionWavFile(path, channels, sampleRate, options)
      const bytes = real.writeRenditionWav(channels, sampleRate, options)
      const look = new Transform({
        transform(chunk: Buffer, _e, done) {
          disk.seenUnderFinalName.push(...readdirSync(disk.renditionsDir).filter(isOpaqueName))
          done(null, chunk)
        },
      })
      await pipeline(blocksOf(bytes), look, fillingDisk(path, Math.floor(bytes.length / 2)))
    },
  }
})

const mediaDir = mkdtempSync(join(tmpdir(), 'ringdown-rendition-write-'))
const folders = mediaFolders(mediaDir)
disk.renditionsDir = folders.renditions
let t: TestApp
let developer: Agent

beforeAll(async () => {
  t = await buildApp({ config: { mediaDir } })
  developer = await signInAs(t.app, 'developer')
})
afterAll(async () => {
  await t.close()
  rmSync(mediaDir, { recursive: true, force: true })
})

const filesIn = (dir: string) => {
  try {
    return readdirSync(dir)
  } catch {
    return []
  }
}

describe('a rendition write that fails half-way', () => {
  it('leaves no file under a final name, nor its part', async () => {
    const wrote: string[] = []
    await expect(
      writeRenditionFile(folders, async (path) => {
        wrote.push(path)
        await pipeline(blocksOf(new Uint8Array(16_384).fill(7)), fillingDisk(path, 10_000))
      }),
    ).rejects.toMatchObject({ code: 'ENOSPC' })
    expect(wrote).toHaveLength(1)
    // The writer was never handed the final name, and what it left is gone.
    expect(isOpaqueName(wrote[0].slice(wrote[0].lastIndexOf('/') + 1))).toBe(false)
    expect(filesIn(folders.renditions)).toEqual([])
  })

  it('refuses the upload and keeps neither original, rendition nor row', async () => {
    const recipeId = await addRecipe(t.knex, 'Full disk')
    const excerptId = (await developer.get('/api/excerpts')).body.excerpts[0].id
    const tone = synth.bowedTone({ f0: 330, seconds: 3, attackSeconds: 0.05, delaySeconds: 0.1 })
    disk.full = true
    let res
    try {
      res = await developer
        .post('/api/clips')
        .field('recipeId', String(recipeId))
        .field('excerptId', String(excerptId))
        .field('performerCode', 'FD-1')
        .field('instrumentCode', 'VN-1')
        .field('kind', 'bowed')
        .attach('file', Buffer.from(encodeWav([tone], 48_000, { bitDepth: 16 })), {
          filename: 'take.wav',
          contentType: 'audio/wav',
        })
    } finally {
      disk.full = false
    }
    // A full disk is the server's trouble, not the request's.
    expect(res.status).toBeGreaterThanOrEqual(500)
    expect(disk.seenUnderFinalName).toEqual([])
    expect(filesIn(folders.renditions)).toEqual([])
    expect(filesIn(folders.originals)).toEqual([])
    expect(filesIn(folders.incoming)).toEqual([])
    expect(await t.knex('clips').count({ n: '*' })).toEqual([{ n: 0 }])
  })
})
