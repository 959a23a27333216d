// Fetches and decodes the clips of a trial before it starts, so switching never waits on the
// network and every clip is ready at the same instant.

export interface LoadProgress {
  loaded: number
  /** Bytes expected in all; 0 while a server has not said how long a file is. */
  total: number
}

async function fetchBytes(
  url: string,
  onBytes: (loaded: number, total: number) => void,
  signal?: AbortSignal,
): Promise<ArrayBuffer> {
  const res = await fetch(url, { signal, credentials: 'same-origin' })
  if (!res.ok) throw new Error(`The recording could not be loaded (${res.status}).`)
  const total = Number(res.headers.get('Content-Length')) || 0
  if (!res.body) {
    const buf = await res.arrayBuffer()
    onBytes(buf.byteLength, buf.byteLength)
    return buf
  }
  const reader = res.body.getReader()
  const parts: Uint8Array[] = []
  let loaded = 0
  for (;;) {
    const { done, value } = await reader.read()
    if (done) break
    parts.push(value)
    loaded += value.byteLength
    onBytes(loaded, Math.max(total, loaded))
  }
  const out = new Uint8Array(loaded)
  let at = 0
  for (const p of parts) {
    out.set(p, at)
    at += p.byteLength
  }
  return out.buffer
}

export async function loadClips(
  ctx: BaseAudioContext,
  urls: string[],
  onProgress: (p: LoadProgress) => void = () => {},
  signal?: AbortSignal,
): Promise<AudioBuffer[]> {
  const loaded = urls.map(() => 0)
  const totals = urls.map(() => 0)
  const report = () =>
    onProgress({
      loaded: loaded.reduce((a, b) => a + b, 0),
      total: totals.every((t) => t > 0) ? totals.reduce((a, b) => a + b, 0) : 0,
    })
  const bytes = await Promise.all(
    urls.map((url, i) =>
      fetchBytes(
        url,
        (l, t) => {
          loaded[i] = l
          totals[i] = t
          report()
        },
        signal,
      ),
    ),
  )
  return Promise.all(bytes.map((b) => ctx.decodeAudioData(b)))
}
