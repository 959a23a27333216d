import { createReadStream } from 'node:fs'
import { stat } from 'node:fs/promises'
import { pipeline } from 'node:stream/promises'
import type { Request, Response } from 'express'
import { notFound } from '../errors'

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
 * A rendition with Range support, written here rather than through res.sendFile, which always
 * adds an ETag from size and time: a value that could match the same recording served under
 * another code and so tell a listener two samples are one.
 */
export async function sendAudio(req: Request, res: Response, path: string): Promise<void> {
  const size = await stat(path).then(
    (s) => s.size,
    () => {
      throw notFound('That recording')
    },
  )
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
  // A listener who skips ahead closes the request; that is not a server fault.
  await pipeline(createReadStream(path, { start, end }), res).catch(() => undefined)
}
