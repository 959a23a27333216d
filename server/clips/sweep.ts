/*
 * What a stopped process leaves in the media folder: upload parts, originals whose clip row was
 * never written (or was deleted before its file), renditions no row names, and parts of media
 * files cut off mid-write. The sweep removes them and says how many and how much, never which.
 */
import { readdir, rm, stat } from 'node:fs/promises'
import { join } from 'node:path'
import type { Knex } from 'knex'
import type { AppContext } from '../context'
import { serialised } from './balance'
import { isHeld } from './filesInProgress'
import { isOpaqueName, mediaFolders, PART_NAME, type MediaFolders } from './storage'

export interface Tally {
  files: number
  bytes: number
}

export interface SweepReport {
  /** Upload parts and media files cut off mid-write. */
  parts: Tally
  /** Originals no clip row names. */
  originals: Tally
  /** Renditions no clip row names. */
  renditions: Tally
  /** Files that should have gone but could not be removed (permissions, say). */
  failed: number
  /** Files clip rows name that are missing or empty: a sweep cannot mend these. */
  missing: number
}

interface Entry {
  name: string
  path: string
  size: number
  mtimeMs: number
}

async function filesIn(dir: string): Promise<Entry[]> {
  let names: string[]
  try {
    names = (await readdir(dir, { withFileTypes: true }))
      .filter((d) => d.isFile())
      .map((d) => d.name)
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code === 'ENOENT') return []
    throw err
  }
  const entries: Entry[] = []
  for (const name of names) {
    const path = join(dir, name)
    // A file may go between listing and looking at it: its writer renamed or removed it.
    const s = await stat(path).catch(() => null)
    if (s) entries.push({ name, path, size: s.size, mtimeMs: s.mtimeMs })
  }
  return entries
}

// The smallest WAV or FLAC that holds a sample is larger than this; a named file this small
// was cut off before its first sample.
const EMPTY_BYTES = 44

/**
 * Removes leftovers last changed before `cutoffMs` (epoch ms). Upload parts this process is
 * still working on are never touched. Originals and renditions are looked at inside the set
 * queue, where every clip write runs from its first file to its commit: a file no row names
 * there belongs to no upload in progress in this process. The cutoff keeps the files of
 * anything else writing to the folder (a seed run, a process still shutting down).
 */
export async function sweepMedia(
  knex: Knex,
  folders: MediaFolders,
  cutoffMs: number,
): Promise<SweepReport> {
  const report: SweepReport = {
    parts: { files: 0, bytes: 0 },
    originals: { files: 0, bytes: 0 },
    renditions: { files: 0, bytes: 0 },
    failed: 0,
    missing: 0,
  }
  const remove = async (entry: Entry, tally: Tally) => {
    try {
      await rm(entry.path)
      tally.files++
      tally.bytes += entry.size
    } catch (err) {
      if ((err as NodeJS.ErrnoException).code !== 'ENOENT') report.failed++
    }
  }
  const stale = (e: Entry) => e.mtimeMs < cutoffMs

  for (const e of await filesIn(folders.incoming))
    if (PART_NAME.test(e.name) && stale(e) && !isHeld(e.path)) await remove(e, report.parts)

  await serialised(knex, async () => {
    // Files first, rows second: a row committed in between is then seen, never its file missed.
    const originals = await filesIn(folders.originals)
    const renditions = await filesIn(folders.renditions)
    const rows: { original_file: string; rendition_file: string }[] = await knex('clips').select(
      'original_file',
      'rendition_file',
    )
    const named = {
      originals: new Set(rows.map((r) => r.original_file)),
      renditions: new Set(rows.map((r) => r.rendition_file)),
    }
    for (const kind of ['originals', 'renditions'] as const) {
      const entries = kind === 'originals' ? originals : renditions
      const present = new Map(entries.map((e) => [e.name, e]))
      for (const name of named[kind])
        if ((present.get(name)?.size ?? 0) < EMPTY_BYTES) report.missing++
      for (const e of entries) {
        if (!stale(e)) continue
        // Names of neither kind are not ours (a note someone left): they stay.
        if (PART_NAME.test(e.name)) await remove(e, report.parts)
        else if (isOpaqueName(e.name) && !named[kind].has(e.name)) await remove(e, report[kind])
      }
    }
  })
  return report
}

const megabytes = (bytes: number) => (bytes / 2 ** 20).toFixed(1)

/** The report as one log line: counts and sizes only. */
export function sweepSummary(r: SweepReport): string {
  const part = (t: Tally, what: string) => `${t.files} ${what} (${megabytes(t.bytes)} MB)`
  return `Media sweep removed ${part(r.parts, 'unfinished files')}, ${part(r.originals, 'originals without a clip')}, ${part(r.renditions, 'renditions without a clip')}`
}

const MINUTE_MS = 60_000
/**
 * A file changed within this long may belong to another process still writing to the folder
 * (a seed run, say); a long set of takes renders in minutes, so an hour is far past any of them.
 */
export const SWEEP_SAFE_AGE_MS = 60 * MINUTE_MS
// A process being replaced may still finish its requests for its shutdown grace (plus the
// margin before its hard exit); the first sweep waits that out.
const AFTER_PREVIOUS_PROCESS_MS = 2_000

export interface MediaSweep {
  /** No new run starts; resolves when a run in progress has finished. */
  stop(): Promise<void>
}

/**
 * The sweep as the server runs it: once at start-up, over everything changed before this
 * process started (what a killed process left), then every `config.sweepMinutes` over what is
 * older than SWEEP_SAFE_AGE_MS. 0 turns it off. Findings go to the log.
 */
export function startMediaSweep(ctx: AppContext): MediaSweep {
  const minutes = ctx.config.sweepMinutes
  if (minutes <= 0) return { stop: async () => {} }
  const folders = mediaFolders(ctx.config.mediaDir)
  const startedMs = Date.now() - process.uptime() * 1000
  let running: Promise<void> = Promise.resolve()
  let stopped = false

  const run = (cutoffMs: number) => {
    if (stopped) return
    running = running.then(async () => {
      try {
        const report = await sweepMedia(ctx.knex, folders, cutoffMs)
        const removed = report.parts.files + report.originals.files + report.renditions.files
        if (removed > 0) ctx.logger.info({ sweep: report }, sweepSummary(report))
        if (report.failed > 0)
          ctx.logger.warn(`Media sweep could not remove ${report.failed} leftover files`)
        if (report.missing > 0)
          ctx.logger.warn(
            `Media sweep: ${report.missing} files named by clips are missing or empty`,
          )
      } catch (err) {
        ctx.logger.error({ err }, 'Media sweep failed')
      }
    })
  }
  const first = setTimeout(
    () => run(startedMs),
    ctx.config.shutdownGraceMs + AFTER_PREVIOUS_PROCESS_MS,
  )
  const every = setInterval(() => run(Date.now() - SWEEP_SAFE_AGE_MS), minutes * MINUTE_MS)
  first.unref()
  every.unref()
  return {
    async stop() {
      stopped = true
      clearTimeout(first)
      clearInterval(every)
      await running
    },
  }
}
