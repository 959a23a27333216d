import { AppError } from '../errors'
import { AudioError, type AudioErrorCode } from '../audio/index.ts'
import { RecordingRefused } from '../clips/measure'
import type { ErrorCode } from '../../shared/types/api'

/*
 * A class does not survive a thread: what a worker throws arrives on the main thread as a plain
 * Error with the same message. The errors callers tell apart by class travel as data instead
 * and are made again on the other side; anything else (a missing file, a full disk) is thrown
 * as it is, and keeps its message, `code` and `syscall` on the way.
 */

export type TaskFailure =
  | { kind: 'app'; code: ErrorCode; message: string; extra: AppError['extra'] }
  | { kind: 'audio'; code: AudioErrorCode; message: string }
  | { kind: 'refused'; message: string }

export type TaskOutcome<T> = { ok: true; value: T } | { ok: false; failure: TaskFailure }

/** Runs `work` in the thread and turns the errors that carry meaning into data. */
export async function outcomeOf<T>(work: () => Promise<T>): Promise<TaskOutcome<T>> {
  try {
    return { ok: true, value: await work() }
  } catch (err) {
    if (err instanceof AppError)
      return {
        ok: false,
        failure: { kind: 'app', code: err.code, message: err.message, extra: err.extra },
      }
    if (err instanceof AudioError)
      return { ok: false, failure: { kind: 'audio', code: err.code, message: err.message } }
    if (err instanceof RecordingRefused)
      return { ok: false, failure: { kind: 'refused', message: err.message } }
    throw err
  }
}

/** The value of an outcome, or the error the task threw, made again as its own class. */
export function valueOf<T>(outcome: TaskOutcome<T>): T {
  if (outcome.ok) return outcome.value
  const f = outcome.failure
  switch (f.kind) {
    case 'app':
      throw new AppError(f.code, f.message, f.extra)
    case 'audio':
      throw new AudioError(f.code, f.message)
    case 'refused':
      throw new RecordingRefused(f.message)
  }
}
