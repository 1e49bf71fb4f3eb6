import { createHash } from 'node:crypto'
import { crc32, deflateSync } from 'node:zlib'
import sharp from 'sharp'
import { describe, expect, it } from 'vitest'
import { AppError } from '../../server/errors'
import { PHOTO_LIMIT_BYTES, preparePhoto, sniffPhoto } from '../../server/images/photo'

/** A grey picture with a light stripe, as PNG or JPEG (with camera metadata when asked). */
async function picture(format: 'png' | 'jpeg', withCamera = false): Promise<Buffer> {
  let image = sharp({ create: { width: 120, height: 80, channels: 3, background: { r: 150, g: 150, b: 150 } } })
    .composite([{ input: { create: { width: 120, height: 10, channels: 3, background: '#eee' } }, top: 35, left: 0 }])
    [format]()
  if (withCamera) {
    image = image.withMetadata({
      exif: {
        IFD0: { Make: 'Example Camera Co', Model: 'X1', Copyright: 'someone' },
        IFD3: { GPSLatitudeRef: 'N', GPSLatitude: '45/1 30/1 0/1' },
      },
    })
  }
  return image.toBuffer()
}

/** A valid PNG header that claims width × height pixels, followed by a tiny compressed body. */
function pngClaiming(width: number, height: number): Buffer {
  const chunk = (type: string, data: Buffer) => {
    const body = Buffer.concat([Buffer.from(type, 'latin1'), data])
    const out = Buffer.alloc(8 + data.length + 4)
    out.writeUInt32BE(data.length, 0)
    body.copy(out, 4)
    out.writeUInt32BE(crc32(body), 8 + data.length)
    return out
  }
  const ihdr = Buffer.alloc(13)
  ihdr.writeUInt32BE(width, 0)
  ihdr.writeUInt32BE(height, 4)
  ihdr[8] = 8 // bit depth
  ihdr[9] = 0 // grey
  return Buffer.concat([
    Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]),
    chunk('IHDR', ihdr),
    chunk('IDAT', deflateSync(Buffer.alloc(1000))),
    chunk('IEND', Buffer.alloc(0)),
  ])
}

async function refusal(bytes: Buffer): Promise<AppError> {
  try {
    await preparePhoto(bytes, 'photo:jet', 'Shadowgraph of the jet')
  } catch (error) {
    if (error instanceof AppError) return error
    throw error
  }
  throw new Error('the photograph was accepted')
}

describe('preparePhoto', () => {
  it('keeps a PNG and a JPEG as pictures of their own type, with the original’s sha256', async () => {
    for (const format of ['png', 'jpeg'] as const) {
      const bytes = await picture(format)
      const photo = await preparePhoto(bytes, 'photo:jet', 'Jet')
      expect(photo.contentType).toBe(`image/${format}`)
      expect([photo.width, photo.height]).toEqual([120, 80])
      expect(photo.originalSha256).toBe(createHash('sha256').update(bytes).digest('hex'))
      expect(photo.sha256).toBe(createHash('sha256').update(photo.bytes).digest('hex'))
      expect((await sharp(photo.bytes).metadata()).format).toBe(format === 'png' ? 'png' : 'jpeg')
    }
  })

  it('strips camera metadata (make, model, GPS) by re-encoding', async () => {
    const bytes = await picture('jpeg', true)
    expect((await sharp(bytes).metadata()).exif).toBeDefined()
    const photo = await preparePhoto(bytes, 'photo:jet', 'Jet')
    expect((await sharp(photo.bytes).metadata()).exif).toBeUndefined()
    expect(photo.bytes.includes(Buffer.from('Example Camera Co'))).toBe(false)
  })

  it('reads the type from the bytes: an SVG, a GIF, a PDF, text named .png and an empty file are refused', async () => {
    const svg = Buffer.from('<?xml version="1.0"?>\n<svg xmlns="http://www.w3.org/2000/svg"><script>1</script></svg>')
    expect(sniffPhoto(svg)).toEqual({ found: 'an SVG drawing' })
    expect((await refusal(svg)).message).toBe(
      'Shadowgraph of the jet: the file is an SVG drawing; hand in a PNG or JPEG photograph.',
    )
    expect((await refusal(Buffer.from('GIF89a\x01\x00\x01\x00', 'latin1'))).message).toMatch(/is a GIF/)
    expect((await refusal(Buffer.from('%PDF-1.7 ...'))).message).toMatch(/is a PDF/)
    expect((await refusal(Buffer.from('t,thrust\n0,1\n'))).message).toMatch(/not a picture this site reads/)
    expect((await refusal(Buffer.alloc(0))).message).toMatch(/an empty file/)
    const refused = await refusal(svg)
    expect(refused).toMatchObject({ code: 'photo_refused', status: 400, details: { field: 'photo:jet' } })
  })

  it('refuses a picture cut short', async () => {
    for (const format of ['png', 'jpeg'] as const) {
      const bytes = await picture(format)
      const error = await refusal(bytes.subarray(0, bytes.length - 30))
      expect(error.message).toMatch(/damaged or cut short|header cannot be read/)
    }
  })

  it('refuses a small file that claims an enormous picture, from its header, and a file over 10 MB', async () => {
    const bomb = pngClaiming(100_000, 100_000)
    expect(bomb.length).toBeLessThan(2000)
    const error = await refusal(bomb)
    expect(error.message).toBe(
      'Shadowgraph of the jet: the picture is 100000 × 100000 pixels (10000 megapixels); at most 40 megapixels are accepted.',
    )
    const large = await refusal(Buffer.concat([await picture('png'), Buffer.alloc(PHOTO_LIMIT_BYTES)]))
    expect(large).toMatchObject({ code: 'photo_refused', status: 413 })
    expect(large.message).toMatch(/at most 10 MB/)
  })
})
