import { resolve } from 'node:path'

/*
 * Upload parts this process is writing or still has to measure and store. The media sweep
 * never removes one of these, however old: a slow upload of a large batch can take longer than
 * any age the sweep waits for. Kept per process, as the files are.
 */
const held = new Set<string>()

export function holdFile(path: string): void {
  held.add(resolve(path))
}

export function releaseFile(path: string): void {
  held.delete(resolve(path))
}

export const isHeld = (path: string): boolean => held.has(resolve(path))
