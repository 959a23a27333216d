import { open } from 'node:fs/promises'
import { decodeFlac, decodeFlacFile } from './decodeFlac.ts'
import { decodeWav, decodeWavFile } from './decodeWav.ts'
import { AudioError } from './errors.ts'
import { sniffContainer } from './sniff.ts'
import type { DecodedAudio, DecodeOptions } from './types.ts'

/** Decodes whatever the bytes say they are; the file name is never asked. */
export async function decodeAudio(
  bytes: Uint8Array,
  options: DecodeOptions = {},
): Promise<DecodedAudio> {
  if (bytes.length === 0) throw new AudioError('empty', 'The file is empty.')
  const container = sniffContainer(bytes)
  if (container === 'wav' || container === 'rf64') return decodeWav(bytes, options)
  if (container === 'flac') return decodeFlac(bytes, options)
  throw new AudioError('not_audio', 'The file is not a WAV or FLAC recording.')
}

/**
 * Decodes a file on disk as `decodeAudio` decodes its bytes, reading it in blocks: the file is
 * never held whole beside its samples (a 40 MB upload would otherwise cost its size twice over).
 */
export async function decodeAudioFile(
  path: string,
  options: DecodeOptions = {},
): Promise<DecodedAudio> {
  const head = new Uint8Array(12)
  const file = await open(path, 'r')
  let length: number
  try {
    length = (await file.read(head, 0, head.length, 0)).bytesRead
  } finally {
    await file.close()
  }
  if (length === 0) throw new AudioError('empty', 'The file is empty.')
  const container = sniffContainer(head.subarray(0, length))
  if (container === 'wav' || container === 'rf64') return decodeWavFile(path, options)
  if (container === 'flac') return decodeFlacFile(path, options)
  throw new AudioError('not_audio', 'The file is not a WAV or FLAC recording.')
}
