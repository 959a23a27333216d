import type { Request, Response } from 'express'

/** One byte range of `size`, or 'whole' when the header asks for none we serve, or null. */
export function byteRange(
  header: string | undefined,
  size: number,
): { start: number; end: number } | 'whole' | null {
  if (!header) return 'whole'
  const m = /^bytes=(\d*)-(\d*)$/.exec(header.trim())
  // Several ranges at once are allowed to be answered with the whole file.
  if (!m || (m[1] === '' && m[2] === '')) return 'whole'
  if (m[1] === '') {
    const suffix = Number(m[2])
    return suffix === 0 ? null : { start: Math.max(0, size - suffix), end: size - 1 }
  }
  const start = Number(m[1])
  const end = m[2] === '' ? size - 1 : Math.min(Number(m[2]), size - 1)
  return start >= size || end < start ? null : { start, end }
}

/**
 * Audio bytes with Range support, written here rather than through res.sendFile, which always
 * adds an ETag from size and time: a value that could match the same recording served under
 * another code and so tell a listener two samples are one.
 */
export function sendAudio(req: Request, res: Response, bytes: Uint8Array): void {
  const size = bytes.length
  res.setHeader('Content-Type', 'audio/wav')
  res.setHeader('Cache-Control', 'private, no-cache')
  res.setHeader('Accept-Ranges', 'bytes')
  const range = byteRange(req.headers.range, size)
  if (range === null) {
    res.setHeader('Content-Range', `bytes */${size}`)
    res.status(416).end()
    return
  }
  const { start, end } = range === 'whole' ? { start: 0, end: size - 1 } : range
  if (range !== 'whole') {
    res.status(206)
    res.setHeader('Content-Range', `bytes ${start}-${end}/${size}`)
  }
  res.setHeader('Content-Length', String(Math.max(0, end - start + 1)))
  if (req.method === 'HEAD' || size === 0) {
    res.end()
    return
  }
  res.end(Buffer.from(bytes.buffer, bytes.byteOffset + start, end - start + 1))
}
