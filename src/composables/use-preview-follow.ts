import { nextTick, watch } from 'vue'
import type { Ref, WatchSource } from 'vue'

/**
 * Keeps the editor's preview at the part rendered from the cursor's line. The preview's blocks
 * carry `data-source-line` (checkModule with `sourceLines`); the block that starts last at or
 * before the cursor's line is scrolled to the top of the preview box. Only the box scrolls, never
 * the page, so the editor stays where the person is typing.
 */
export function usePreviewFollow(box: Ref<HTMLElement | null>, html: WatchSource<string>) {
  let line = 0

  function scroll() {
    const el = box.value
    if (!el || line < 1) return
    let target: HTMLElement | null = null
    let best = 0
    for (const block of Array.from(el.querySelectorAll<HTMLElement>('[data-source-line]'))) {
      const start = Number(block.dataset.sourceLine)
      // `>` keeps the outer block when a list and its first item start on the same line.
      if (start <= line && start > best) {
        best = start
        target = block
      }
    }
    // A line in the front matter (before the first block) shows the top of the preview.
    const top = target ? target.getBoundingClientRect().top - el.getBoundingClientRect().top + el.scrollTop - 8 : 0
    el.scrollTop = Math.max(0, top)
  }

  // A new rendering (the person typed) keeps the preview at the cursor.
  watch(html, () => void nextTick(scroll), { flush: 'post' })

  return {
    /** The cursor is now on this 1-based source line. */
    follow(cursorLine: number) {
      line = cursorLine
      scroll()
    },
  }
}
