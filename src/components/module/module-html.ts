import DOMPurify from 'dompurify'
import type { Config, DOMPurify as Purifier, WindowLike } from 'dompurify'
import {
  EXTERNAL_LINK_REL,
  MODULE_HTML,
  classAllowed,
  isExternalLink,
  keptStyle,
  urlAllowed,
} from '@shared/modules/html-allow-list'

/**
 * The browser's sanitiser for module HTML: DOMPurify built from the same allow-list as the server's
 * sanitize-html (shared/modules/html-allow-list.ts). The server already sanitised what it sends; this
 * second pass means a module page never puts HTML into the document that the allow-list does not
 * name, whatever the server stored in the past. DOMPurify's own lists are global, so the per-element
 * rules (which attribute on which element, classes, style declarations, URL schemes) run in a hook.
 * https://github.com/cure53/DOMPurify#hooks
 */

const ALL_ATTRIBUTES = [...new Set(Object.values(MODULE_HTML.attributes).flat())]

const CONFIG: Config = {
  ALLOWED_TAGS: [...MODULE_HTML.tags],
  ALLOWED_ATTR: ALL_ATTRIBUTES,
  // Only the data-* and aria-* attributes the list names.
  ALLOW_DATA_ATTR: false,
  ALLOW_ARIA_ATTR: false,
  // DOMPurify's default pattern without tel:, sms: and the like; the hook applies the list's schemes.
  ALLOWED_URI_REGEXP: /^(?:(?:https?|mailto):|[^a-z]|[a-z+.-]+(?:[^a-z+.\-:]|$))/i,
}

/** A DOMPurify instance with the module allow-list's hooks, on the given window (the page's, or jsdom's in tests). */
export function createModuleSanitizer(window?: WindowLike): (html: string) => string {
  const purifier: Purifier = window ? DOMPurify(window) : DOMPurify
  purifier.addHook('uponSanitizeAttribute', (node, event) => {
    const element = node.nodeName.toLowerCase()
    const name = event.attrName
    if (!MODULE_HTML.attributes[element]?.includes(name) && !MODULE_HTML.attributes['*']?.includes(name)) {
      event.keepAttr = false
      return
    }
    if (name === 'class') {
      event.attrValue = event.attrValue
        .split(/\s+/)
        .filter((c) => c && classAllowed(element, c))
        .join(' ')
    } else if (name === 'style') {
      event.attrValue = keptStyle(element, event.attrValue)
    } else if (MODULE_HTML.urlAttributes.includes(name) && !urlAllowed(element, event.attrValue)) {
      event.keepAttr = false
      return
    }
    if ((name === 'class' || name === 'style') && !event.attrValue) event.keepAttr = false
  })
  purifier.addHook('afterSanitizeAttributes', (node) => {
    if (node.nodeName.toLowerCase() !== 'a') return
    const href = node.getAttribute('href') ?? ''
    if (isExternalLink(href)) node.setAttribute('rel', EXTERNAL_LINK_REL)
    else node.removeAttribute('rel')
  })
  return (html) => purifier.sanitize(html, CONFIG) as string
}

let pageSanitizer: ((html: string) => string) | undefined

/** Sanitises module HTML for this page (one DOMPurify instance, made on first use). */
export function sanitizeModuleHtml(html: string): string {
  pageSanitizer ??= createModuleSanitizer()
  return pageSanitizer(html)
}
