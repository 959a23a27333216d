// One AudioContext for the whole player page: browsers limit how many may exist, and clips that
// must stay in sync have to share one clock.

let shared: AudioContext | null = null

export function audioContext(): AudioContext {
  if (!shared) shared = new AudioContext({ latencyHint: 'interactive' })
  return shared
}

/** Browsers start a context suspended until the page has been touched; call from a click. */
export async function wakeAudio(): Promise<AudioContext> {
  const ctx = audioContext()
  if (ctx.state === 'suspended') await ctx.resume()
  return ctx
}
