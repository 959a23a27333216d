/** Waits until a server started as a child process answers its health route. */
export async function waitForHealth(base: string, tries = 300): Promise<void> {
  for (let i = 0; i < tries; i++) {
    const ok = await fetch(`${base}/api/health`).then(
      (r) => r.ok,
      () => false,
    )
    if (ok) return
    await new Promise((r) => setTimeout(r, 100))
  }
  throw new Error('The server did not start')
}
