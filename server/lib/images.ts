import { fileTypeFromBuffer } from 'file-type'
import sharp, { type Metadata } from 'sharp'
import { UnsupportedMediaError, ValidationError } from './errors'

/** Limits for one photo, written in the README: 15 MB and 40 megapixels. */
export const PHOTO_MAX_BYTES = 15 * 1024 * 1024
export const PHOTO_MAX_PIXELS = 40_000_000
const THUMB_SIZE = 480
const ACCEPTED = new Map([
  ['image/jpeg', 'jpg'],
  ['image/png', 'png'],
  ['image/webp', 'webp'],
])

const UNREADABLE = 'That photo could not be read. It may be damaged; try taking it again.'

/** A photo of a kind we take that we still cannot use; the issue points at the upload's field. */
function photoRefused(message: string, code: string): never {
  throw new ValidationError(message, [{ path: ['body', 'photos'], message }], code)
}

export interface ProcessedImage {
  full: Buffer
  thumb: Buffer
  contentType: 'image/jpeg' | 'image/webp' | 'image/png'
  extension: string
  width: number
  height: number
}

/**
 * Decides the type from the bytes (never the name or the browser's header), applies the camera's
 * orientation and re-encodes, which drops every metadata block including GPS position.
 */
export async function processPhoto(data: Buffer): Promise<ProcessedImage> {
  const detected = await fileTypeFromBuffer(data)
  if (!detected || !ACCEPTED.has(detected.mime)) {
    throw new UnsupportedMediaError('That file is not a photo we can use. Send a JPEG, PNG or WebP picture.', 'unsupported_image')
  }
  let meta: Metadata
  try {
    meta = await sharp(data, { limitInputPixels: false }).metadata()
  } catch {
    photoRefused(UNREADABLE, 'unreadable_image')
  }
  const pixels = (meta.width ?? 0) * (meta.height ?? 0)
  if (pixels > PHOTO_MAX_PIXELS) {
    photoRefused(
      `That photo is ${Math.round(pixels / 1e6)} megapixels; the most we take is ${PHOTO_MAX_PIXELS / 1e6}. Use a lower camera resolution.`,
      'image_too_large',
    )
  }
  try {
    const image = sharp(data, { limitInputPixels: PHOTO_MAX_PIXELS }).rotate()
    // PNG stays PNG (screenshots, diagrams); camera photos become JPEG.
    const asPng = detected.mime === 'image/png'
    const encoded = asPng ? image.png({ compressionLevel: 9 }) : image.jpeg({ quality: 85, mozjpeg: true })
    const { data: full, info } = await encoded.toBuffer({ resolveWithObject: true })
    const thumb = await sharp(full)
      .resize({ width: THUMB_SIZE, height: THUMB_SIZE, fit: 'inside', withoutEnlargement: true })
      .jpeg({ quality: 78 })
      .toBuffer()
    return {
      full,
      thumb,
      contentType: asPng ? 'image/png' : 'image/jpeg',
      extension: asPng ? 'png' : 'jpg',
      width: info.width,
      height: info.height,
    }
  } catch {
    photoRefused(UNREADABLE, 'unreadable_image')
  }
}
