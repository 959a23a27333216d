import { toneSamples, type ToneKind } from './headphoneTrials'

/** Plays one trial's three tones; resolves when the last has ended. `stop` cuts them short. */
export function playTones(ctx: AudioContext, tones: readonly ToneKind[]) {
  const [left, right] = toneSamples(tones, ctx.sampleRate)
  const buffer = ctx.createBuffer(2, left.length, ctx.sampleRate)
  buffer.copyToChannel(left, 0)
  buffer.copyToChannel(right, 1)
  const src = ctx.createBufferSource()
  src.buffer = buffer
  src.connect(ctx.destination)
  const done = new Promise<void>((resolve) => {
    src.onended = () => resolve()
  })
  src.start()
  return {
    done,
    stop: () => {
      try {
        src.stop()
      } catch {
        // Already ended.
      }
    },
  }
}
