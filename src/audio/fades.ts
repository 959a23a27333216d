// Gain ramps for switching between clips that play in sync. A short raised-cosine ramp hides
// the click a hard cut makes, and at 5 ms it is far too short to be heard as a crossfade.

/** Length of every switching ramp, in seconds. */
export const FADE_SECONDS = 0.005

/** Points per ramp: enough that the steps are far below one sample's worth of change. */
export const FADE_POINTS = 64

/** Raised-cosine shape from 0 to 1 at x in [0, 1]; its slope is zero at both ends. */
export function raisedCosine(x: number): number {
  const c = Math.min(1, Math.max(0, x))
  return 0.5 - 0.5 * Math.cos(Math.PI * c)
}

/** The values of a ramp from `from` to `to`, both ends included, for setValueCurveAtTime. */
export function rampCurve(
  from: number,
  to: number,
  points = FADE_POINTS,
): Float32Array<ArrayBuffer> {
  const curve = new Float32Array(points)
  for (let i = 0; i < points; i++) {
    curve[i] = from + (to - from) * raisedCosine(i / (points - 1))
  }
  return curve
}

/** One scheduled ramp of one gain, in the audio clock's seconds. */
export interface Ramp {
  from: number
  to: number
  start: number
  duration: number
}

/**
 * The gain a ramp gives at time t. A switch that comes while an earlier ramp is still running
 * starts its own ramp from here, so quick switching never jumps.
 */
export function gainAt(ramp: Ramp, t: number): number {
  if (t <= ramp.start) return ramp.from
  if (t >= ramp.start + ramp.duration) return ramp.to
  return ramp.from + (ramp.to - ramp.from) * raisedCosine((t - ramp.start) / ramp.duration)
}

/** Target gains when clip `selected` of `count` is the one heard. */
export function targetGains(count: number, selected: number): number[] {
  return Array.from({ length: count }, (_, i) => (i === selected ? 1 : 0))
}

/** A playhead on a timeline with an optional loop, as a source node with loop points moves. */
export function wrapPosition(
  position: number,
  loop: { start: number; end: number } | null,
  duration: number,
): number {
  if (loop && position >= loop.end) {
    const span = loop.end - loop.start
    return span > 0 ? loop.start + ((position - loop.start) % span) : loop.start
  }
  return Math.min(position, duration)
}
