export interface Figure {
  name: string
  value: number
  unit: string
  /** Human-readable bar, e.g. "< 1000". */
  target: string
  better: 'lower' | 'higher'
}

/** Median of a few timed runs after one warm-up run: what a warm server sees. */
export function timeMedian(runs: number, fn: () => unknown): number {
  fn()
  const times: number[] = []
  for (let i = 0; i < runs; i++) {
    const start = performance.now()
    fn()
    times.push(performance.now() - start)
  }
  times.sort((a, b) => a - b)
  return times[Math.floor(times.length / 2)]
}

export const round = (x: number, digits = 1) => Number(x.toFixed(digits))
