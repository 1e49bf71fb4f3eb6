/**
 * Zoom and pan of the measuring tool's picture: the part of the picture in view is the SVG's
 * `viewBox`, so marks and pointer positions stay in the picture's own pixels whatever the zoom. The
 * wheel zooms about the pointer; the buttons and keys about the middle or the cross-hair.
 */
import { computed, onBeforeUnmount, onMounted, ref } from 'vue'
import type { Ref } from 'vue'
import type { Point } from '@shared/images/jet-marks'
import type { ImageSize } from './mark-draft'

export const MAX_ZOOM = 16

export function usePhotoView(size: () => ImageSize, svg: Ref<SVGSVGElement | null>) {
  const zoom = ref(1)
  const centre = ref<Point>({ x: size().width / 2, y: size().height / 2 })
  const view = computed(() => {
    const { width, height } = size()
    const w = width / zoom.value
    const h = height / zoom.value
    const x = Math.min(Math.max(centre.value.x - w / 2, 0), width - w)
    const y = Math.min(Math.max(centre.value.y - h / 2, 0), height - h)
    return { x, y, w, h }
  })
  const viewBox = computed(() => `${view.value.x} ${view.value.y} ${view.value.w} ${view.value.h}`)

  // The SVG's size on the screen, for marks drawn in screen pixels.
  const box = ref({ width: 1, height: 1 })
  let observer: ResizeObserver | null = null
  onMounted(() => {
    if (!svg.value) return
    observer = new ResizeObserver(([entry]) => {
      if (entry) box.value = { width: entry.contentRect.width || 1, height: entry.contentRect.height || 1 }
    })
    observer.observe(svg.value)
  })
  onBeforeUnmount(() => observer?.disconnect())
  /** Image pixels per screen pixel (the SVG fits the view into its box, keeping the aspect). */
  const unit = computed(() => Math.max(view.value.w / box.value.width, view.value.h / box.value.height))

  /** Zooms to `z` (1 = the whole picture), keeping `about` where it is on the screen. */
  function setZoom(z: number, about?: Point) {
    const next = Math.min(Math.max(z, 1), MAX_ZOOM)
    if (about) {
      const k = zoom.value / next
      centre.value = {
        x: about.x + (view.value.x + view.value.w / 2 - about.x) * k,
        y: about.y + (view.value.y + view.value.h / 2 - about.y) * k,
      }
    }
    zoom.value = next
    if (next === 1) centre.value = { x: size().width / 2, y: size().height / 2 }
  }

  /** Moves the view by (dx, dy) picture pixels, never past the picture's edges. */
  function pan(dx: number, dy: number) {
    centre.value = { x: view.value.x + view.value.w / 2 + dx, y: view.value.y + view.value.h / 2 + dy }
    // Settle on the clamped view, so a pan back starts from what is seen.
    centre.value = { x: view.value.x + view.value.w / 2, y: view.value.y + view.value.h / 2 }
  }

  /** Centres the view on `p` (a cross-hair or a nudged mark) when it has left the view. */
  function keepInView(p: Point) {
    const v = view.value
    if (p.x < v.x || p.x > v.x + v.w || p.y < v.y || p.y > v.y + v.h) centre.value = { ...p }
  }

  /** A screen position as picture pixels, through the SVG's own screen matrix. */
  function toImage(clientX: number, clientY: number): Point | null {
    const m = svg.value?.getScreenCTM()
    if (!m) return null
    const p = new DOMPoint(clientX, clientY).matrixTransform(m.inverse())
    return { x: p.x, y: p.y }
  }

  function onWheel(ev: WheelEvent) {
    // Zooming out at full view lets the page scroll on.
    if (ev.deltaY > 0 && zoom.value === 1) return
    ev.preventDefault()
    setZoom(zoom.value * (ev.deltaY < 0 ? 1.25 : 0.8), toImage(ev.clientX, ev.clientY) ?? undefined)
  }

  return { zoom, centre, view, viewBox, unit, setZoom, pan, keepInView, toImage, onWheel }
}
