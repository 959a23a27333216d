import { measureRecording, type Measured } from '../clips/measure'
import { renderSet, type RenderedMember } from '../clips/renditions'
import type { MediaFolders } from '../clips/storage'
import type { SetMember } from '../clips/setMembers'
import type { ClipKind } from '../../shared/schemas/clips'
import { outcomeOf, type TaskOutcome } from './outcome'

/*
 * Clip work for the worker threads. Both tasks take paths, never audio: the thread reads the
 * file itself, so a 170 MB upload is not copied between threads, and only the measures and the
 * names of the files written come back.
 */

/** Decodes and measures the recording at `path` (see measureRecording). */
export function measureClipTask(path: string, kind: ClipKind): Promise<TaskOutcome<Measured>> {
  return outcomeOf(() => measureRecording(path, kind))
}

/** Writes the renditions one matched set needs (see renderSet in server/clips/renditions.ts). */
export function renderSetTask(
  folders: MediaFolders,
  set: SetMember[],
): Promise<TaskOutcome<RenderedMember[]>> {
  return outcomeOf(() => renderSet(folders, set))
}
