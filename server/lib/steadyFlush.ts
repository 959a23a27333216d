import { open } from 'node:fs/promises'

/*
 * Large files are flushed to the disk as they are written, a few megabytes at a time, rather
 * than all at once when complete. The kernel otherwise keeps a whole ten-minute take (170 MB)
 * in memory and writes it out in one burst at the final fsync or when its timer runs out; every
 * answer save in the meantime waits behind that burst for its own small log flush (measured:
 * save p99 53-72 ms during an upload, 28-29 ms with flushing as the file grows). The final
 * fsync before the rename stays (server/clips/storage.ts): it makes the file whole on disk.
 */

/** Bytes written between two flushes of one file. */
export const FLUSH_EVERY_BYTES = 8 * 1024 * 1024

/** Flushes the data of the file at `path`; any descriptor of a file flushes the same data. */
export async function flushFileData(path: string): Promise<void> {
  const file = await open(path, 'r')
  try {
    await file.datasync()
  } finally {
    await file.close()
  }
}

/**
 * Counts the bytes written to one file and says when it is time to flush them. A separate
 * counter per file, so that two files written at once each flush at their own pace.
 */
export function flushCounter(every = FLUSH_EVERY_BYTES) {
  let since = 0
  return {
    /** Adds `bytes` just written; true when the file should be flushed now. */
    wrote(bytes: number): boolean {
      since += bytes
      if (since < every) return false
      since = 0
      return true
    },
  }
}
