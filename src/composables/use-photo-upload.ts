/**
 * One photograph of a hand-in: the chosen file (checked in the browser as the server will check it:
 * PNG or JPEG by its first bytes, at most 10 MB and 40 megapixels), its object URL and size for the
 * measuring tool, the marks being placed, and the scale length as typed. The measuring tool's own
 * rules are in src/components/photo/mark-draft.ts.
 */
import { getCurrentScope, onScopeDispose, ref, shallowRef } from 'vue'
import type { Ref, ShallowRef } from 'vue'
import { MAX_IMAGE_PIXELS } from '@shared/images/jet-marks'
import type { StudentImageSpec } from '@shared/schemas/student-module-spec'
import { newEditor } from '@/components/photo/mark-draft'
import type { ImageSize, MarkEditor } from '@/components/photo/mark-draft'

/** Largest photograph the server takes (server/images/photo.ts). */
export const PHOTO_LIMIT_BYTES = 10 * 1024 * 1024

export interface PhotoUpload {
  spec: StudentImageSpec
  file: ShallowRef<File | null>
  /** An object URL of the chosen file, for the tool; null before one is chosen. */
  url: Ref<string | null>
  /** The picture's size in pixels, once the browser has read it. */
  size: Ref<ImageSize | null>
  /** True while the file is being read. */
  reading: Ref<boolean>
  /** Why the chosen file cannot be sent, or ''. */
  fileProblem: Ref<string>
  editor: Ref<MarkEditor>
  scaleText: Ref<string>
  scaleUnit: Ref<string>
  setFile: (file: File | null) => Promise<void>
  /** The measuring tool's changes: the marks, and the scale length's text and unit. */
  setEditor: (editor: MarkEditor) => void
  setScaleText: (text: string) => void
  setScaleUnit: (unit: string) => void
}

/** What a file's first bytes say it is: 'png', 'jpeg', or what it is instead, in words. */
export function sniffPhotoHead(head: Uint8Array): 'png' | 'jpeg' | { found: string } {
  const png = [0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]
  if (head.length >= 8 && png.every((b, i) => head[i] === b)) return 'png'
  if (head.length >= 3 && head[0] === 0xff && head[1] === 0xd8 && head[2] === 0xff) return 'jpeg'
  if (head.length === 0) return { found: 'empty' }
  const text = new TextDecoder('latin1').decode(head.subarray(0, 512)).trimStart().toLowerCase()
  if (text.startsWith('<svg') || (text.startsWith('<?xml') && text.includes('<svg'))) return { found: 'an SVG drawing' }
  if (text.startsWith('gif8')) return { found: 'a GIF' }
  if (text.startsWith('riff') && text.slice(8, 12) === 'webp') return { found: 'a WebP image' }
  if (text.startsWith('%pdf')) return { found: 'a PDF' }
  return { found: 'not a PNG or JPEG picture' }
}

/**
 * Why a chosen file cannot be handed in as a photograph (its size, then its type from its first
 * bytes), or '' when it can. `label` names the photograph, as the server's messages do.
 */
export function photoFileProblem(file: { name: string; size: number }, head: Uint8Array, label: string): string {
  if (file.size > PHOTO_LIMIT_BYTES) {
    return `${label}: ${file.name} is ${(file.size / 1048576).toFixed(1)} MB; a photograph may be at most 10 MB.`
  }
  const type = sniffPhotoHead(head)
  if (typeof type !== 'string') {
    return type.found === 'empty'
      ? `${label}: ${file.name} is empty.`
      : `${label}: ${file.name} is ${type.found}; choose a PNG or JPEG photograph.`
  }
  return ''
}

/** Why a picture of this size cannot be handed in, or ''. */
export function photoSizeProblem(size: ImageSize, label: string): string {
  if (size.width * size.height > MAX_IMAGE_PIXELS) {
    return `${label}: the picture is ${size.width} × ${size.height} pixels (${((size.width * size.height) / 1e6).toFixed(0)} megapixels); at most 40 megapixels are taken.`
  }
  return ''
}

/** Reads a picture's size in the browser (natural size, after the browser's own EXIF rotation). */
async function naturalSize(url: string): Promise<ImageSize> {
  const img = new Image()
  img.src = url
  await img.decode()
  return { width: img.naturalWidth, height: img.naturalHeight }
}

export function usePhotoUpload(spec: StudentImageSpec): PhotoUpload {
  const file = shallowRef<File | null>(null)
  const url = ref<string | null>(null)
  const size = ref<ImageSize | null>(null)
  const reading = ref(false)
  const fileProblem = ref('')
  const editor = ref<MarkEditor>(newEditor())
  const scaleText = ref('')
  const scaleUnit = ref('mm')

  function release() {
    if (url.value) URL.revokeObjectURL(url.value)
    url.value = null
  }
  // The page's scope frees the object URL when the form goes away.
  if (getCurrentScope()) onScopeDispose(release)

  /** Which choice is current: a slow read of an earlier file must not overwrite a later one. */
  let latest = 0

  async function setFile(f: File | null) {
    const mine = ++latest
    release()
    file.value = f
    size.value = null
    fileProblem.value = ''
    // Marks belong to one picture: a new picture starts with none.
    editor.value = newEditor()
    if (!f) return
    reading.value = true
    try {
      const head = new Uint8Array(await f.slice(0, 512).arrayBuffer())
      if (mine !== latest) return
      fileProblem.value = photoFileProblem(f, head, spec.label)
      if (fileProblem.value) return
      const u = URL.createObjectURL(f)
      try {
        const s = await naturalSize(u)
        if (mine !== latest) {
          URL.revokeObjectURL(u)
          return
        }
        fileProblem.value = photoSizeProblem(s, spec.label)
        if (fileProblem.value) {
          URL.revokeObjectURL(u)
          return
        }
        url.value = u
        size.value = s
      } catch {
        URL.revokeObjectURL(u)
        if (mine !== latest) return
        fileProblem.value = `${spec.label}: ${f.name} could not be read as a picture (it may be cut short).`
      }
    } finally {
      if (mine === latest) reading.value = false
    }
  }

  return {
    spec,
    file,
    url,
    size,
    reading,
    fileProblem,
    editor,
    scaleText,
    scaleUnit,
    setFile,
    setEditor: (e) => (editor.value = e),
    setScaleText: (t) => (scaleText.value = t),
    setScaleUnit: (u) => (scaleUnit.value = u),
  }
}
