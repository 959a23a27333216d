/**
 * Waits until a server started as a child process answers its health route: `/api/health`
 * (alive) by default, or `/api/health/ready` (threads warmed up, database and media usable).
 */
export async function waitForHealth(
  base: string,
  tries = 300,
  path = '/api/health',
): Promise<void> {
  for (let i = 0; i < tries; i++) {
    const ok = await fetch(`${base}${path}`).then(
      (r) => r.ok,
      () => false,
    )
    if (ok) return
    await new Promise((r) => setTimeout(r, 100))
  }
  throw new Error('The server did not start')
}
