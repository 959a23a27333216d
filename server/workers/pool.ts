import workerpool from 'workerpool'
import type { TaskName, Tasks } from './tasks'

export interface PoolLoad {
  /** Threads in the pool (0: tasks run on the main thread). */
  threads: number
  busy: number
  /** Tasks waiting for a free thread. */
  waiting: number
  /** Tasks finished since start, and how many of them failed. */
  done: number
  failed: number
  /** The threads are still loading and warming up (the server is not ready yet). */
  starting: boolean
}

export interface WorkerPool {
  /** Whether tasks run in threads; findings need a database file a thread can open. */
  readonly threaded: boolean
  run<K extends TaskName>(
    task: K,
    ...args: Parameters<Tasks[K]>
  ): Promise<Awaited<ReturnType<Tasks[K]>>>
  load(): PoolLoad
  close(): Promise<void>
}

const bootFile = new URL('./boot.mjs', import.meta.url).pathname

/**
 * Heavy work (findings, decoding and measuring clips, writing renditions) runs here so that the
 * event loop keeps answering players. With `threads` 0 the same tasks run inline, which tests
 * on an in-memory database need and which keeps a one-core machine from paying for a thread.
 */
export function createWorkerPool(
  threads: number,
  options: { warmUpDatabase?: string } = {},
): WorkerPool {
  let done = 0
  let failed = 0
  let inlineBusy = 0
  const count = <T>(p: Promise<T>) =>
    p.then(
      (v) => {
        done++
        return v
      },
      (err: unknown) => {
        done++
        failed++
        throw err
      },
    )

  if (threads <= 0) {
    const table = import('./tasks')
    return {
      threaded: false,
      run(task, ...args) {
        inlineBusy++
        return count(
          table.then(({ tasks }) =>
            (tasks[task] as (...a: unknown[]) => unknown)(...args),
          ) as Promise<never>,
        ).finally(() => inlineBusy--)
      },
      load: () => ({ threads: 0, busy: inlineBusy, waiting: 0, done, failed, starting: false }),
      async close() {},
    }
  }

  const pool = workerpool.pool(bootFile, {
    workerType: 'thread',
    minWorkers: threads,
    maxWorkers: threads,
    // A task that never finishes must not hold a thread for ever; findings and a long clip
    // both finish in seconds.
    workerTerminateTimeout: 1000,
  })
  // Every thread loads the code and runs the analyses once now, not on a user's first page;
  // readiness waits for it. A warm-up that fails only leaves that thread cold.
  let starting = true
  void Promise.allSettled(
    Array.from({ length: threads }, () =>
      Promise.resolve(pool.exec('warmUp', [options.warmUpDatabase ?? null])),
    ),
  ).then(() => (starting = false))
  return {
    threaded: true,
    run(task, ...args) {
      return count(Promise.resolve(pool.exec(task, args) as unknown as Promise<never>))
    },
    load() {
      const s = pool.stats()
      return { threads, busy: s.busyWorkers, waiting: s.pendingTasks, done, failed, starting }
    },
    async close() {
      await pool.terminate(true)
    },
  }
}
