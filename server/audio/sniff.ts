export type AudioContainer = 'wav' | 'rf64' | 'flac' | 'unknown'

function ascii(bytes: Uint8Array, offset: number, length: number): string {
  if (bytes.length < offset + length) return ''
  return String.fromCharCode(...bytes.subarray(offset, offset + length))
}

/**
 * The container named by the file's own first bytes. The uploaded name and the browser's MIME
 * type are chosen by the sender and prove nothing, so they are never consulted.
 */
export function sniffContainer(bytes: Uint8Array): AudioContainer {
  const head = ascii(bytes, 0, 4)
  if (head === 'fLaC') return 'flac'
  if (ascii(bytes, 8, 4) !== 'WAVE') return 'unknown'
  if (head === 'RIFF') return 'wav'
  if (head === 'RF64') return 'rf64'
  return 'unknown'
}
