import { open, rm } from 'node:fs/promises'
import { flushCounter } from '../lib/steadyFlush'
import { dbToGain } from './level.ts'
import { encodeWav, pcmWavHeader, writeSamples } from './wavEncoder.ts'

export interface RenditionOptions {
  bitDepth: 16 | 24
  gainDb: number
}

/**
 * A blind rendition: a new file holding only the format and data chunks, so nothing the
 * original carried (titles, comments, recorder and software names, dates) can reveal a recipe.
 * The gain is applied in floating point and the result rounded without dither, so the same clip
 * always renders to the same bytes.
 */
export function writeRenditionWav(
  channels: readonly Float32Array[],
  sampleRate: number,
  options: RenditionOptions,
): Uint8Array {
  return encodeWav(channels, sampleRate, {
    bitDepth: options.bitDepth,
    format: 'pcm',
    gain: dbToGain(options.gainDb),
  })
}

type FileHandle = Awaited<ReturnType<typeof open>>

/** Writes every byte: a write may take fewer than it was given. */
async function writeAll(file: FileHandle, bytes: Uint8Array) {
  for (let done = 0; done < bytes.length;) {
    done += (await file.write(bytes, done, bytes.length - done)).bytesWritten
  }
}

// Bytes of samples encoded and written at a time.
const WRITE_BLOCK = 1024 * 1024

/**
 * The bytes `writeRenditionWav` makes, written to a new file at `path` block by block, so the
 * file is never held whole in memory. The file must not exist yet; if writing fails half-way,
 * what was written is removed before the error goes on.
 */
export async function writeRenditionWavFile(
  path: string,
  channels: readonly Float32Array[],
  sampleRate: number,
  options: RenditionOptions,
): Promise<void> {
  const frames = channels[0]?.length ?? 0
  const blockAlign = (options.bitDepth / 8) * channels.length
  const gain = dbToGain(options.gainDb)
  const file = await open(path, 'wx')
  try {
    await writeAll(file, pcmWavHeader(channels.length, sampleRate, options.bitDepth, frames))
    const blockFrames = Math.max(1, Math.floor(WRITE_BLOCK / blockAlign))
    const block = new Uint8Array(Math.min(frames, blockFrames) * blockAlign)
    // Flushed as it grows, so a long rendition never leaves the disk one large burst to write.
    const flush = flushCounter()
    for (let from = 0; from < frames; from += blockFrames) {
      const to = Math.min(frames, from + blockFrames)
      const bytes = block.subarray(0, (to - from) * blockAlign)
      // A reused block must start clean: a channel shorter than the first leaves its end silent.
      bytes.fill(0)
      writeSamples(bytes, channels, 'pcm', options.bitDepth, gain, from, to)
      await writeAll(file, bytes)
      if (flush.wrote(bytes.length)) await file.datasync()
    }
    if ((frames * blockAlign) & 1) await writeAll(file, new Uint8Array(1))
    await file.close()
  } catch (err) {
    await file.close().catch(() => {})
    await rm(path, { force: true })
    throw err
  }
}
