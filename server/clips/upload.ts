import { randomBytes } from 'node:crypto'
import { mkdirSync, rmSync } from 'node:fs'
import { join } from 'node:path'
import { Transform } from 'node:stream'
import type { NextFunction, Request, RequestHandler, Response } from 'express'
import multer, { MulterError } from 'multer'
import { AppError, badRequest } from '../errors'
import { megabytes, refuseDeclaredOver, uploadTooLarge } from '../http/uploadSize'
import type { UploadedFile } from './storage'
import { holdFile, releaseFile } from './filesInProgress'
import { flushCounter, flushFileData } from '../lib/steadyFlush'

export interface TempUploadOptions {
  /** Folder for files still being checked; it must sit on the media folder's disk. */
  dir: string
  /** Largest single file. */
  maxMb: number
  /** Largest total of all files of one request. */
  batchMaxMb: number
  fields: { name: string; maxCount: number }[]
}

// The temp path each file of an upload is written to, known once multer has named it.
const tempPathOf = new WeakMap<Express.Multer.File, string>()

function tempFilesOf(res: Response): string[] {
  return ((res.locals.tempFiles as string[] | undefined) ??= [])
}

/** Deletes whatever this request wrote to the temp folder and has not moved away. */
export function discardTempFiles(res: Response): void {
  for (const path of tempFilesOf(res)) {
    rmSync(path, { force: true })
    releaseFile(path)
  }
}

/**
 * Disk storage whose files pass through a counter of the request's file bytes on their way to
 * disk. Once the total passes the limit the file being written fails, which makes the upload
 * fail: nothing more is written, and the files so far are deleted like any failed upload's.
 */
function countedStorage(disk: multer.StorageEngine, limit: number, refusal: () => Error) {
  const engine: multer.StorageEngine = {
    _handleFile(req, file, cb) {
      const locals = req.res!.locals
      locals.uploadBytes ??= 0
      const flush = flushCounter()
      const counted = new Transform({
        transform(chunk: Buffer, _encoding, done) {
          const total = (locals.uploadBytes as number) + chunk.length
          locals.uploadBytes = total
          if (total > limit) return done(refusal())
          const path = tempPathOf.get(file)
          if (!flush.wrote(chunk.length) || !path) return done(null, chunk)
          // The upload waits for the flush (the sender is slowed for a moment, not the server);
          // one that fails is left to the final fsync, which reports it.
          flushFileData(path).then(
            () => done(null, chunk),
            () => done(null, chunk),
          )
        },
      })
      // A failure on either side ends both, as one stream would.
      file.stream.on('error', (err) => counted.destroy(err))
      file.stream.pipe(counted)
      Object.defineProperty(file, 'stream', { value: counted, configurable: true })
      disk._handleFile(req, file, cb)
    },
    _removeFile: (req, file, cb) => disk._removeFile(req, file, cb),
  }
  return engine
}

/**
 * Multipart upload to a temp folder under random names. Every file written is remembered, and
 * deleted when the handler is done, when the upload fails half-way, and again when the response
 * closes: a refused or interrupted upload never leaves a file behind. Each file is held to
 * `maxMb` and all files of the request together to `batchMaxMb`: a request that declares a
 * length over that is refused before it is read, and the files are counted as they arrive.
 */
export function tempUpload(options: TempUploadOptions): RequestHandler {
  const disk = multer.diskStorage({
    destination: (_req, _file, cb) => {
      mkdirSync(options.dir, { recursive: true })
      cb(null, options.dir)
    },
    filename: (req, file, cb) => {
      const name = `${randomBytes(16).toString('hex')}.part`
      const path = join(options.dir, name)
      tempFilesOf(req.res!).push(path)
      tempPathOf.set(file, path)
      // Until the response closes, the media sweep leaves this part alone.
      holdFile(path)
      cb(null, name)
    },
  })
  const storage = countedStorage(disk, megabytes(options.batchMaxMb), () =>
    uploadTooLarge(options.batchMaxMb),
  )
  const declared = refuseDeclaredOver(options.batchMaxMb)
  const upload = multer({
    storage,
    // The full name is kept so that a name with a path in it can be refused, not quietly cut.
    preservePath: true,
    defParamCharset: 'utf8',
    limits: {
      fileSize: megabytes(options.maxMb),
      files: options.fields.reduce((n, f) => n + f.maxCount, 0),
      fields: 40,
      fieldSize: 100_000,
    },
  }).fields(options.fields)

  return (req: Request, res: Response, next: NextFunction) => {
    res.once('close', () => discardTempFiles(res))
    declared(req, res, (refused?: unknown) => {
      if (refused) return next(refused)
      upload(req, res, (err?: unknown) => {
        if (!err) return next()
        discardTempFiles(res)
        next(uploadError(err, options))
      })
    })
  }
}

function uploadError(err: unknown, options: TempUploadOptions): unknown {
  // The multipart parser's own refusals: the request itself cannot be read.
  if (err instanceof Error && /^Malformed part header/.test(err.message))
    return badRequest(
      'The upload could not be read: a part header is malformed (a file name with control characters, for example)',
    )
  if (err instanceof Error && /^(Unexpected end of form|Malformed)/.test(err.message))
    return badRequest(`The upload could not be read: ${err.message.toLowerCase()}`)
  if (!(err instanceof MulterError)) return err
  switch (err.code) {
    case 'LIMIT_FILE_SIZE':
      return new AppError(
        'payload_too_large',
        `A file is larger than the upload limit of ${options.maxMb} MB; nothing was stored`,
      )
    case 'LIMIT_UNEXPECTED_FILE':
    case 'LIMIT_FILE_COUNT':
      return badRequest(
        `Unexpected file in "${err.field ?? ''}": send ${options.fields
          .map((f) => `up to ${f.maxCount} in "${f.name}"`)
          .join(' and ')}`,
      )
    default:
      return badRequest(`Upload refused: ${err.message}`)
  }
}

/** The uploaded files of one field, as plain data for a service. */
export function filesOf(req: Request, field: string): UploadedFile[] {
  const files = (req.files as Record<string, Express.Multer.File[]> | undefined)?.[field] ?? []
  return files.map((f) => ({
    path: f.path,
    name: f.originalname,
    mimeType: f.mimetype,
    size: f.size,
  }))
}
