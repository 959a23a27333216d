import { decodeFlac } from './decodeFlac.ts'
import { decodeWav } from './decodeWav.ts'
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
