/**
 * Photographs in a hand-in: checked from their bytes, decoded under a pixel limit, and re-encoded so
 * that nothing but the picture is kept (no EXIF: no GPS position, no camera serial, no thumbnail).
 *
 * The type is read from the file's first bytes, never from its name or the browser's word: only PNG
 * and JPEG pass. SVG (a document that can carry scripts) and everything else is refused before any
 * decoder sees it. The header's size is checked first, and the decoder itself is told the same
 * pixel limit, so a small file that unpacks to billions of pixels (a "decompression bomb") is
 * refused without being decoded. sharp decodes on libuv's thread pool, so a large photograph does not
 * hold up other requests.
 */
import { createHash } from 'node:crypto'
import sharp from 'sharp'
import { MAX_IMAGE_PIXELS } from '../../shared/images/jet-marks'
import { AppError } from '../errors'

export const PHOTO_LIMIT_BYTES = 10 * 1024 * 1024

export type PhotoType = 'image/png' | 'image/jpeg'

export interface PreparedPhoto {
  contentType: PhotoType
  width: number
  height: number
  /** sha256 of the file as uploaded (kept; the upload itself is not). */
  originalSha256: string
  originalSize: number
  /** The re-encoded picture, without metadata, and its sha256. */
  bytes: Buffer
  sha256: string
}

const PNG_SIGNATURE = Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a])

/** What the first bytes say the file is: PNG, JPEG, or a word for what was found instead. */
export function sniffPhoto(bytes: Buffer): PhotoType | { found: string } {
  if (bytes.length >= 8 && bytes.subarray(0, 8).equals(PNG_SIGNATURE)) return 'image/png'
  if (bytes.length >= 3 && bytes[0] === 0xff && bytes[1] === 0xd8 && bytes[2] === 0xff) return 'image/jpeg'
  const head = bytes.subarray(0, 512).toString('latin1').trimStart().toLowerCase()
  if (head.startsWith('<svg') || (head.startsWith('<?xml') && head.includes('<svg'))) return { found: 'an SVG drawing' }
  if (head.startsWith('gif8')) return { found: 'a GIF' }
  if (head.startsWith('riff') && head.slice(8, 12) === 'webp') return { found: 'a WebP image' }
  if (head.startsWith('%pdf')) return { found: 'a PDF' }
  if (bytes.length === 0) return { found: 'an empty file' }
  return { found: 'not a picture this site reads' }
}

const refuse = (field: string, message: string, status = 400) =>
  new AppError('photo_refused', message, status, { field })

/**
 * Checks and re-encodes one uploaded photograph. `label` names it in messages ("Shadowgraph of the jet").
 *
 * @throws AppError photo_refused (400, 413 when over the size limit) naming the field and the reason
 */
export async function preparePhoto(bytes: Buffer, field: string, label: string): Promise<PreparedPhoto> {
  if (bytes.length > PHOTO_LIMIT_BYTES) {
    throw refuse(
      field,
      `${label}: the file is ${(bytes.length / 1048576).toFixed(1)} MB; a photograph may be at most 10 MB.`,
      413,
    )
  }
  const type = sniffPhoto(bytes)
  if (typeof type !== 'string') {
    throw refuse(field, `${label}: the file is ${type.found}; hand in a PNG or JPEG photograph.`)
  }
  // The header alone, without the decoder's own pixel limit, so an oversized picture is named by its size.
  const meta = await sharp(bytes, { limitInputPixels: false })
    .metadata()
    .catch(() => undefined)
  if (!meta) {
    throw refuse(
      field,
      `${label}: the file starts like a ${type === 'image/png' ? 'PNG' : 'JPEG'} but its header cannot be read.`,
    )
  }
  const width = meta.width ?? 0
  const height = meta.height ?? 0
  if (width * height > MAX_IMAGE_PIXELS) {
    throw refuse(
      field,
      `${label}: the picture is ${width} × ${height} pixels (${((width * height) / 1e6).toFixed(0)} megapixels); at most 40 megapixels are accepted.`,
    )
  }
  const pipeline = sharp(bytes, { limitInputPixels: MAX_IMAGE_PIXELS, failOn: 'truncated' }).rotate()
  const out = await (type === 'image/png' ? pipeline.png() : pipeline.jpeg({ quality: 92 }))
    .toBuffer({ resolveWithObject: true })
    .catch(() => undefined)
  if (!out) {
    throw refuse(field, `${label}: the picture is damaged or cut short and cannot be read; upload it again.`)
  }
  return {
    contentType: type,
    width: out.info.width,
    height: out.info.height,
    originalSha256: createHash('sha256').update(bytes).digest('hex'),
    originalSize: bytes.length,
    bytes: out.data,
    sha256: createHash('sha256').update(out.data).digest('hex'),
  }
}
