import { isMainThread } from 'node:worker_threads'
import workerpool from 'workerpool'
import { findingsTask } from './findingsTask'
import { measureClipTask, renderSetTask } from './clipTasks'
import { warmUpTask } from './warmUp'

/**
 * Everything the worker threads can be asked to do, by name. Each task takes and returns plain
 * data (structured-cloneable): no knex, no request, no logger crosses a thread.
 */
export const tasks = {
  findings: findingsTask,
  measureClip: measureClipTask,
  renderSet: renderSetTask,
  warmUp: warmUpTask,
}

export type Tasks = typeof tasks
export type TaskName = keyof Tasks

if (!isMainThread)
  workerpool.worker(tasks as unknown as Record<string, (...a: unknown[]) => unknown>)
