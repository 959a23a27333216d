import { isMainThread } from 'node:worker_threads'
import workerpool from 'workerpool'
import { findingsTask } from './findingsTask'

/**
 * Everything the worker threads can be asked to do, by name. Each task takes and returns plain
 * data (structured-cloneable): no knex, no request, no logger crosses a thread.
 */
export const tasks = {
  findings: findingsTask,
}

export type Tasks = typeof tasks
export type TaskName = keyof Tasks

if (!isMainThread)
  workerpool.worker(tasks as unknown as Record<string, (...a: unknown[]) => unknown>)
