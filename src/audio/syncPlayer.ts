import { FADE_SECONDS, gainAt, rampCurve, targetGains, wrapPosition, type Ramp } from './fades'
import { recordSwitch } from './devFlags'

export interface LoopRegion {
  start: number
  end: number
}

/** Shortest loop: anything shorter is heard as a stutter, not as music (BS.1534 asks ≥ 500 ms). */
export const MIN_LOOP_SECONDS = 0.5

/** Lead time so every source starts on the same render quantum, in seconds. */
const START_LEAD = 0.02

/**
 * All clips of a trial play at once from one clock, each through its own gain; only the
 * selected clip's gain is up. Switching moves gains with 5 ms ramps, so the playhead never
 * moves and nothing restarts: the listener compares the same bar of music, string against string.
 */
export class SyncPlayer {
  readonly duration: number
  private readonly master: GainNode
  private readonly gains: GainNode[]
  private readonly ramps: Ramp[]
  private sources: AudioBufferSourceNode[] = []
  private generation = 0
  private startedAt = 0
  private startOffset = 0
  private pausedAt = 0
  private listeners = new Set<() => void>()
  selected = 0
  playing = false
  loop: LoopRegion | null = null

  constructor(
    private readonly ctx: AudioContext,
    private readonly buffers: AudioBuffer[],
  ) {
    this.duration = Math.max(...buffers.map((b) => b.duration))
    this.master = ctx.createGain()
    this.master.connect(ctx.destination)
    const targets = targetGains(buffers.length, 0)
    this.gains = buffers.map((_, i) => {
      const g = ctx.createGain()
      g.gain.value = targets[i]
      g.connect(this.master)
      return g
    })
    this.ramps = targets.map((t) => ({ from: t, to: t, start: 0, duration: 0 }))
  }

  /** Loops may only cover what every clip holds, or the shorter clips would fall out of step. */
  get loopLimit(): number {
    return Math.min(...this.buffers.map((b) => b.duration))
  }

  onChange(listener: () => void): () => void {
    this.listeners.add(listener)
    return () => this.listeners.delete(listener)
  }

  private changed() {
    for (const l of this.listeners) l()
  }

  position(): number {
    if (!this.playing) return this.pausedAt
    const raw = this.startOffset + Math.max(0, this.ctx.currentTime - this.startedAt)
    return wrapPosition(raw, this.loop, this.duration)
  }

  play(): void {
    if (this.playing) return
    const offset = this.pausedAt >= this.duration - 0.01 ? 0 : this.pausedAt
    this.startSources(offset)
    this.playing = true
    this.changed()
  }

  pause(): void {
    if (!this.playing) return
    this.pausedAt = this.position()
    this.stopSources()
    this.playing = false
    this.changed()
  }

  toggle(): void {
    if (this.playing) this.pause()
    else this.play()
  }

  seek(time: number): void {
    const t = Math.min(Math.max(0, time), this.duration)
    if (this.playing) {
      this.stopSources()
      this.startSources(t)
    } else this.pausedAt = t
    this.changed()
  }

  /** Sets or clears the loop; the playhead moves into a new loop so it is heard at once. */
  setLoop(region: LoopRegion | null): void {
    const limit = this.loopLimit
    if (region) {
      const start = Math.min(Math.max(0, region.start), Math.max(0, limit - MIN_LOOP_SECONDS))
      const end = Math.min(limit, Math.max(region.end, start + MIN_LOOP_SECONDS))
      this.loop = { start, end }
    } else this.loop = null
    const at = this.position()
    const inside = !this.loop || (at >= this.loop.start && at < this.loop.end)
    const next = inside ? at : this.loop!.start
    if (this.playing) {
      this.stopSources()
      this.startSources(next)
    } else this.pausedAt = next
    this.changed()
  }

  /**
   * Makes clip `index` the one heard. `since` is the time stamp of the key press or click that
   * asked for it, for the switching benchmark.
   */
  select(index: number, since?: number): void {
    if (index < 0 || index >= this.gains.length) return
    const now = this.ctx.currentTime
    const targets = targetGains(this.gains.length, index)
    this.gains.forEach((g, i) => {
      const from = gainAt(this.ramps[i], now)
      const to = targets[i]
      if (from === to && this.ramps[i].to === to) return
      this.ramps[i] = { from, to, start: now, duration: FADE_SECONDS }
      g.gain.cancelScheduledValues(now)
      try {
        g.gain.setValueCurveAtTime(rampCurve(from, to), now, FADE_SECONDS)
      } catch {
        // A browser that keeps a running curve after cancelling refuses an overlapping one.
        g.gain.setValueAtTime(from, now)
        g.gain.linearRampToValueAtTime(to, now + FADE_SECONDS)
      }
    })
    if (since !== undefined) this.recordTiming(since, now)
    this.selected = index
    this.changed()
  }

  private recordTiming(since: number, rampStart: number) {
    const scheduledMs = performance.now() - since
    let outputMs: number | null = null
    const stamp = this.ctx.getOutputTimestamp?.()
    if (stamp?.contextTime !== undefined && stamp.performanceTime !== undefined) {
      // The context time the ramp starts at, mapped onto the page's clock through the output.
      const audibleAt = stamp.performanceTime + (rampStart - stamp.contextTime) * 1000
      outputMs = Math.max(0, audibleAt - since)
    }
    recordSwitch({ scheduledMs, outputMs })
  }

  private startSources(offset: number) {
    const when = this.ctx.currentTime + START_LEAD
    const generation = ++this.generation
    const loop = this.loop
    this.sources = this.buffers.map((buffer, i) => {
      const src = this.ctx.createBufferSource()
      src.buffer = buffer
      if (loop) {
        src.loop = true
        src.loopStart = loop.start
        src.loopEnd = Math.min(loop.end, buffer.duration)
      }
      src.connect(this.gains[i])
      if (offset < buffer.duration) src.start(when, offset)
      return src
    })
    // Starting and stopping fade the whole mix, so play and pause do not click either.
    const m = this.master.gain
    m.cancelScheduledValues(this.ctx.currentTime)
    m.setValueAtTime(0, this.ctx.currentTime)
    m.setValueCurveAtTime(rampCurve(0, 1), when, FADE_SECONDS)
    this.startedAt = when
    this.startOffset = offset
    if (!loop) {
      const longest = this.buffers.findIndex((b) => b.duration === this.duration)
      this.sources[longest].onended = () => {
        if (generation !== this.generation) return
        this.playing = false
        this.pausedAt = 0
        this.sources = []
        this.changed()
      }
    }
  }

  private stopSources() {
    this.generation++
    const now = this.ctx.currentTime
    const m = this.master.gain
    m.cancelScheduledValues(now)
    m.setValueCurveAtTime(rampCurve(m.value, 0), now, FADE_SECONDS)
    for (const s of this.sources) {
      s.onended = null
      try {
        s.stop(now + FADE_SECONDS)
      } catch {
        // A source that was never started (its clip is shorter than the offset) cannot stop.
      }
    }
    this.sources = []
  }

  dispose(): void {
    this.stopSources()
    this.playing = false
    this.listeners.clear()
    for (const g of this.gains) g.disconnect()
    this.master.disconnect()
  }
}
