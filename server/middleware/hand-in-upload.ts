import type { NextFunction, Request, RequestHandler, Response } from 'express'
import multer from 'multer'
import type { Readable, Writable } from 'node:stream'
import { MAX_IMAGES } from '../../shared/modules/image-spec'
import { AppError } from '../errors'
import { PHOTO_LIMIT_BYTES } from '../images/photo'

/**
 * Reading a hand-in's multipart body, with three limits enforced while it streams in:
 * - the whole request may carry at most the upload limit plus {@link FORM_ALLOWANCE_BYTES}, counted
 *   byte by byte as it arrives, so a chunked request (no Content-Length) is stopped as soon as it
 *   passes the limit instead of being read whole;
 * - only the file fields the module declares (`table:<key>`), each once: any other file is refused
 *   when its part header arrives, before a byte of it is kept;
 * - a body that is cut off or is not multipart at all is the sender's fault: a 400, not a 500.
 *
 * A refusal is answered at once; multer's own callback, which comes only after it has drained the
 * body, is then ignored. What happens to the rest of the body depends on whether it is bounded:
 * - a body with a Content-Length within the limit is read and discarded after the answer, so the
 *   connection is closed by nobody and the sender always receives the whole answer (closing a socket
 *   with unread bytes makes the kernel reset it, and the answer can be lost with the reset: a student
 *   handing in while the database is down would see "connection reset" instead of the 503);
 * - a body without a length, or over the limit, is not read further: the answer carries
 *   `Connection: close`.
 */

/** Room for the form's text fields (the JSON payload) and the multipart framing, beyond the files. */
export const FORM_ALLOWANCE_BYTES = 2 * 1024 * 1024
/**
 * Each photograph a sheet asks for (`photo:<key>`) adds its own 10 MB to the hand-in's limit, so a
 * sheet's photographs do not eat into the room for its logs; no sheet asks for more than MAX_IMAGES.
 */
export const PHOTO_ALLOWANCE_BYTES = PHOTO_LIMIT_BYTES
/** The JSON payload field; it names values and mappings, never data rows. */
const FIELD_SIZE_BYTES = 2 * 1024 * 1024
/** Text fields a hand-in form may have (it sends one, `payload`). */
const MAX_TEXT_FIELDS = 5

export interface HandInUploadOptions {
  /** The upload limit per hand-in, in MB (the server's UPLOAD_LIMIT_MB). */
  limitMb: number
  /** The file fields the module declares; may throw (a 404 for a module that is not there). */
  fileFields: (req: Request, res: Response) => Promise<readonly string[]>
}

const MALFORMED = 'The upload was cut off or is not a valid form upload.'

export function handInUpload(opts: HandInUploadOptions): RequestHandler {
  const fileLimit = Math.round(opts.limitMb * 1024 * 1024)
  const requestLimitFor = (photos: number) => fileLimit + photos * PHOTO_ALLOWANCE_BYTES + FORM_ALLOWANCE_BYTES
  const tooLargeFor = (photos: number) => () =>
    new AppError(
      'upload_too_large',
      `The upload is larger than the ${opts.limitMb} MB limit per hand-in${photos > 0 ? ` (with ${(photos * PHOTO_ALLOWANCE_BYTES) / 1048576} MB more for its ${photos === 1 ? 'photograph' : `${photos} photographs`})` : ''}.`,
      413,
      { limitMb: opts.limitMb },
    )

  return async (req: Request, res: Response, next: NextFunction) => {
    // Refused from its Content-Length before any of it is read (and before the database is asked)
    // when no sheet could take it; then against the limit of this sheet, once its files are known.
    const declared = Number(req.headers['content-length'] ?? 0)
    let requestLimit = requestLimitFor(MAX_IMAGES)
    try {
      if (declared > requestLimit) throw tooLargeFor(MAX_IMAGES)()
      const fields = await opts.fileFields(req, res)
      const photos = fields.filter((f) => f.startsWith('photo:')).length
      requestLimit = requestLimitFor(photos)
      const tooLarge = tooLargeFor(photos)
      if (declared > requestLimit) throw tooLarge()
      // Anything but a form upload would be left unread by the parser; say so instead.
      if (!req.is('multipart/form-data')) throw new AppError('bad_upload', MALFORMED, 400)
      await readForm(req, res, { fields, fileLimit, requestLimit, tooLarge, limitMb: opts.limitMb })
    } catch (error) {
      // The body may still be arriving: an unbounded one is not read further once the answer is
      // sent; a bounded one is left to Node, which reads and discards it after the answer.
      if (!req.complete && !(declared > 0 && declared <= requestLimit)) res.set('Connection', 'close')
      throw error
    }
    next()
  }
}

/** The most bytes one file field may carry: a photograph its 10 MB, a log the hand-in's limit. */
function fieldLimit(field: string, fileLimit: number): number {
  return field.startsWith('photo:') ? PHOTO_ALLOWANCE_BYTES : fileLimit
}

interface FormLimits {
  fields: readonly string[]
  fileLimit: number
  requestLimit: number
  limitMb: number
  tooLarge: () => AppError
}

// multer's own type declarations lack `streamHandler` (multer 2.x README: "streamHandler").
type MulterOptions = multer.Options & { streamHandler: (req: Request, busboy: Writable) => void }

/** Parses the body into req.body and req.files; rejects at the first refusal, without waiting for the rest. */
function readForm(req: Request, res: Response, limits: FormLimits): Promise<void> {
  return new Promise<void>((resolve, reject) => {
    let settled = false
    const fail = (error: unknown) => {
      if (settled) return
      settled = true
      reject(error)
    }
    const taken = new Set<string>()
    const declared = new Set(limits.fields)
    const options: MulterOptions = {
      storage: multer.memoryStorage(),
      // https://github.com/expressjs/multer#limits. One file more than declared still reaches the
      // file filter, which names it; a count limit alone would only say "too many files".
      limits: {
        // The largest any declared field may carry; each field's own limit is counted as it streams.
        fileSize: Math.max(...limits.fields.map((f) => fieldLimit(f, limits.fileLimit)), limits.fileLimit),
        files: limits.fields.length + 1,
        fields: MAX_TEXT_FIELDS,
        fieldSize: FIELD_SIZE_BYTES,
        parts: limits.fields.length + 1 + MAX_TEXT_FIELDS,
      },
      fileFilter: (_req, file, accept) => {
        const refusal = unexpectedFile(file.fieldname, declared, taken)
        if (refusal) {
          fail(refusal)
          accept(refusal)
          return
        }
        taken.add(file.fieldname)
        accept(null, true)
      },
      // multer reports its limits only once the whole body has been drained; these listeners
      // answer at the moment busboy notices, and the byte count stops a body that never ends.
      streamHandler: (request, busboy) => {
        const refuse = (code: multer.ErrorCode, field?: string) =>
          fail(uploadError(new multer.MulterError(code, field), limits.limitMb))
        busboy.on('fieldsLimit', () => refuse('LIMIT_FIELD_COUNT'))
        busboy.on('partsLimit', () => refuse('LIMIT_PART_COUNT'))
        busboy.on('filesLimit', () => refuse('LIMIT_FILE_COUNT'))
        busboy.on('field', (name: string, _value: string, info: { valueTruncated: boolean }) => {
          if (info.valueTruncated) refuse('LIMIT_FIELD_VALUE', name)
        })
        busboy.on('file', (name: string, stream: Readable) => {
          stream.on('limit', () => refuse('LIMIT_FILE_SIZE', name))
          const cap = fieldLimit(name, limits.fileLimit)
          let received = 0
          stream.on('data', (chunk: Buffer) => {
            received += chunk.length
            if (received > cap) refuse('LIMIT_FILE_SIZE', name)
          })
        })
        busboy.on('error', (error: unknown) => fail(uploadError(error, limits.limitMb)))
        let bytes = 0
        request.on('data', (chunk: Buffer) => {
          bytes += chunk.length
          if (bytes > limits.requestLimit && !settled) {
            const error = limits.tooLarge()
            fail(error)
            request.unpipe(busboy)
            busboy.destroy(error)
          }
        })
        request.pipe(busboy)
      },
    }
    multer(options).any()(req, res, (err: unknown) => {
      if (err) fail(uploadError(err, limits.limitMb))
      else if (!settled) {
        settled = true
        resolve()
      }
    })
  })
}

function unexpectedFile(field: string, declared: ReadonlySet<string>, taken: ReadonlySet<string>): AppError | null {
  if (taken.has(field)) {
    return new AppError('bad_upload', `${field}: only one file can be sent for it; this hand-in sends two.`, 400, {
      field,
    })
  }
  if (declared.has(field)) return null
  const asked =
    declared.size === 0 ? 'this module asks for no files' : `this module asks for ${[...declared].join(', ')}`
  return new AppError('bad_upload', `${field}: this module does not ask for that file (${asked}).`, 400, { field })
}

/** What the parser reported, in words for the person who sent it. */
function uploadError(err: unknown, limitMb: number): unknown {
  if (err instanceof AppError) return err
  if (err instanceof multer.MulterError) {
    const field = err.field
    switch (err.code) {
      case 'LIMIT_FILE_SIZE':
        return new AppError(
          'upload_too_large',
          `${field ?? 'The file'} is larger than the ${field?.startsWith('photo:') ? PHOTO_ALLOWANCE_BYTES / 1048576 : limitMb} MB limit.`,
          413,
          { field },
        )
      case 'LIMIT_FIELD_VALUE':
        return new AppError(
          'bad_upload',
          `${field ?? 'A form field'} is larger than ${FIELD_SIZE_BYTES / 1048576} MB.`,
          400,
          { field },
        )
      case 'LIMIT_FILE_COUNT':
      case 'LIMIT_FIELD_COUNT':
      case 'LIMIT_PART_COUNT':
        return new AppError(
          'bad_upload',
          'The upload has more parts than a hand-in form sends (the payload and one file per table or photograph).',
          400,
        )
      default:
        return new AppError('bad_upload', `The upload was refused: ${err.message}.`, 400, { field })
    }
  }
  // Anything else the parser reports (a body cut off before its closing boundary, a missing
  // boundary, a broken part header, a client that went away) is about the bytes sent.
  return new AppError('bad_upload', MALFORMED, 400)
}
