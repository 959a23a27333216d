import { spawn, type ChildProcess } from 'node:child_process'
import { waitForHealth } from './childServer'

export const BENCH_SECRET = 'bench-secret-bench-secret-bench-secret'

export interface ServerProcess {
  base: string
  /** The process itself (its pid for /proc, say). */
  child: ChildProcess
  /** Its exit code once it has ended (null when a signal ended it). */
  exited: Promise<number | null>
  /** SIGTERM, then waits for the process to end. */
  stop(): Promise<void>
}

/**
 * The real server in its own process, as `npm start` runs it (request logs included), on the
 * given database file; the demo sessions and their audio are not wanted in a benchmark. It is
 * started once ready, as a load balancer would wait for (worker threads warmed up), or only
 * alive when `waitFor` says so.
 */
export async function startServer(options: {
  port: number
  databaseFile: string
  mediaDir: string
  env?: Record<string, string>
  /** Extra Node options, e.g. a profiler's. */
  nodeArgs?: string[]
  waitFor?: 'ready' | 'alive'
}): Promise<ServerProcess> {
  const args = [...(options.nodeArgs ?? []), '--import', 'tsx', 'server/index.ts']
  const child = spawn(process.execPath, args, {
    env: {
      ...process.env,
      NODE_ENV: 'test',
      PORT: String(options.port),
      DATABASE_FILE: options.databaseFile,
      MEDIA_DIR: options.mediaDir,
      JWT_SECRET: BENCH_SECRET,
      RINGDOWN_API_ONLY: '1',
      LOGIN_RATE_MAX: '100000',
      ...options.env,
    },
    stdio: ['ignore', 'ignore', 'inherit'],
  })
  const base = `http://127.0.0.1:${options.port}`
  const exited = new Promise<number | null>((r) => child.once('exit', (code) => r(code)))
  try {
    await waitForHealth(
      base,
      300,
      options.waitFor === 'alive' ? '/api/health' : '/api/health/ready',
    )
  } catch (err) {
    child.kill('SIGKILL')
    throw err
  }
  return {
    base,
    child,
    exited,
    async stop() {
      child.kill('SIGTERM')
      await exited
    },
  }
}

/** The p-th percentile (0–100) of some timings, nearest rank. */
export function percentile(values: number[], p: number): number {
  const sorted = [...values].sort((a, b) => a - b)
  return sorted[Math.min(sorted.length - 1, Math.ceil((p / 100) * sorted.length) - 1)] ?? NaN
}
