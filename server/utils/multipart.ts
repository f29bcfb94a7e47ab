import { createWriteStream, type WriteStream } from 'node:fs'
import { mkdir, rm } from 'node:fs/promises'
import { randomUUID } from 'node:crypto'
import { join, resolve } from 'node:path'
import type { H3Event } from 'h3'
import busboy from 'busboy'
import type { ZodType, ZodTypeDef } from 'zod'

/** The one file of an upload, as it landed in a temporary file of the uploads folder. */
export interface ReceivedFile {
  /** The temporary file (named by a random id, never by the client's file name); delete it when done. */
  path: string
  bytes: number
}

export interface ReceivedUpload {
  fields: Record<string, string>
  file: ReceivedFile | null
}

export interface UploadLimits {
  /** The folder the temporary file goes to (the uploads folder, so the final rename stays on one disk). */
  dir: string
  /** The name of the one file field. */
  fileField: string
  /** The largest file in bytes: 413 the moment it is passed, the rest unread. */
  maxFileBytes: number
  /** Text fields at most (each at most 1 KB). */
  maxFields?: number
  /** What the file is called in messages ("photo"). */
  what?: string
}

const MAX_FIELD_BYTES = 1024

/** The configured uploads folder as an absolute path (NUXT_UPLOADS_DIR, default `.local/uploads` of the working directory), created on first use. */
export async function uploadsDir(): Promise<string> {
  const dir = resolve(String(useRuntimeConfig().uploadsDir || '.local/uploads'))
  await mkdir(dir, { recursive: true })
  return dir
}

/**
 * Streams a multipart/form-data request with busboy: text fields into memory (few and short), the one
 * file straight to a temporary file, with back-pressure, so memory stays flat whatever is sent. Past
 * `maxFileBytes`, or with a second file, too many or too long fields, it stops reading, deletes the
 * temporary file and answers 413 or 400 with the connection closed after it. The caller deletes the
 * file it gets (`discardUpload`) once it has kept what it needs.
 */
export function receiveUpload(event: H3Event, limits: UploadLimits): Promise<ReceivedUpload> {
  const req = event.node.req
  const what = limits.what ?? 'file'
  const maxFields = limits.maxFields ?? 8
  let parser: busboy.Busboy
  try {
    parser = busboy({
      headers: req.headers,
      limits: { fileSize: limits.maxFileBytes, files: 1, fields: maxFields, parts: maxFields + 1, fieldSize: MAX_FIELD_BYTES, fieldNameSize: 100 },
    })
  }
  catch {
    throw createError({ statusCode: 400, statusMessage: 'Bad Request', message: 'The body is not a well-formed multipart form' })
  }
  // The whole body may hold the file and the fields with their headers, no more.
  const body = boundedStream(req, limits.maxFileBytes + (maxFields + 1) * (MAX_FIELD_BYTES + 1024))

  return new Promise<ReceivedUpload>((resolvePromise, reject) => {
    const fields: Record<string, string> = {}
    let file: ReceivedFile | null = null
    let out: WriteStream | null = null
    let written: Promise<void> = Promise.resolve()
    let settled = false

    const fail = (statusCode: 400 | 413, message: string) => {
      if (settled) return
      settled = true
      req.unpipe()
      body.unpipe()
      req.pause()
      out?.destroy()
      const path = file?.path
      closeAfterAnswer(event)
      const error = createError({ statusCode, statusMessage: statusCode === 413 ? 'Payload Too Large' : 'Bad Request', message })
      void written.catch(() => {}).finally(() => (path ? rm(path, { force: true }) : undefined)).finally(() => reject(error))
    }
    const tooLarge = () => fail(413, `The ${what} is larger than ${Math.round(limits.maxFileBytes / 1024 / 1024)} MB`)

    parser.on('field', (name, value, info) => {
      if (info.nameTruncated || info.valueTruncated) return fail(400, `${name}: at most ${MAX_FIELD_BYTES} bytes`)
      if (name in fields) return fail(400, `${name}: given more than once`)
      fields[name] = value
    })
    parser.on('file', (name, stream) => {
      if (name !== limits.fileField || file) {
        stream.resume()
        return fail(400, `Send one ${what} in the field "${limits.fileField}"`)
      }
      // Named by a random id: the client's file name never reaches the disk.
      file = { path: join(limits.dir, `.incoming-${randomUUID()}`), bytes: 0 }
      const received = file
      out = createWriteStream(received.path, { flags: 'wx' })
      const target = out
      written = new Promise<void>((done, broken) => {
        target.on('finish', done)
        target.on('error', broken)
        target.on('close', done)
      })
      stream.on('data', (chunk: Buffer) => {
        received.bytes += chunk.length
      })
      stream.on('limit', tooLarge)
      stream.pipe(target)
    })
    parser.on('partsLimit', () => fail(400, 'The form has too many parts'))
    parser.on('fieldsLimit', () => fail(400, 'The form has too many fields'))
    parser.on('filesLimit', () => fail(400, `Send one ${what} only`))
    parser.on('error', () => fail(400, 'The body is not a well-formed multipart form'))
    parser.on('close', () => {
      void written.then(() => {
        if (settled) return
        settled = true
        resolvePromise({ fields, file })
      }, () => fail(400, `The ${what} could not be received`))
    })
    body.on('error', (error) => {
      if (error instanceof TooLargeError) tooLarge()
      else fail(400, 'The body could not be read')
    })
    // A client that goes away mid-upload leaves no temporary file behind.
    req.on('close', () => {
      if (!req.complete) fail(400, 'The upload was interrupted')
    })
    body.pipe(parser)
  })
}

/** Deletes an upload's temporary file, if any (safe to call twice). */
export async function discardUpload(upload: ReceivedUpload): Promise<void> {
  if (upload.file) await rm(upload.file.path, { force: true })
}

/** An upload's text fields parsed with `schema`: 400 with field messages when they do not fit. */
export function validFields<T>(fields: Record<string, string>, schema: ZodType<T, ZodTypeDef, unknown>): T {
  const parsed = schema.safeParse(fields)
  if (!parsed.success) badInput(parsed.error)
  return parsed.data
}
