/**
 * A small scanner for the sanitised HTML that renderModule produces, for assertions about tags and
 * attributes. It relies on what sanitize-html guarantees about its output: attribute values are
 * double-quoted, with `"`, `<` and `>` escaped inside them, so a tag ends at the first `>`.
 */

export interface ScannedTag {
  name: string
  attributes: Record<string, string>
}

const TAG = /<([a-zA-Z][\w:-]*)((?:\s+[^\s=>/]+(?:="[^"]*")?)*)\s*\/?>/g
const ATTRIBUTE = /([^\s=>/]+)(?:="([^"]*)")?/g

/** Decodes the character references a browser would decode in an attribute value. */
export function decodeEntities(text: string): string {
  return text
    .replace(/&#x([0-9a-f]+);?/gi, (_, hex: string) => String.fromCodePoint(parseInt(hex, 16)))
    .replace(/&#(\d+);?/g, (_, dec: string) => String.fromCodePoint(parseInt(dec, 10)))
    .replace(/&colon;/gi, ':')
    .replace(/&tab;/gi, '\t')
    .replace(/&newline;/gi, '\n')
    .replace(/&quot;/g, '"')
    .replace(/&lt;/g, '<')
    .replace(/&gt;/g, '>')
    .replace(/&amp;/g, '&')
}

/** Every opening tag of the HTML with its attributes (values decoded). */
export function scanTags(html: string): ScannedTag[] {
  const tags: ScannedTag[] = []
  for (const match of html.matchAll(TAG)) {
    const attributes: Record<string, string> = {}
    for (const a of (match[2] ?? '').matchAll(ATTRIBUTE)) {
      attributes[(a[1] as string).toLowerCase()] = decodeEntities(a[2] ?? '')
    }
    tags.push({ name: (match[1] as string).toLowerCase(), attributes })
  }
  return tags
}

/** The scheme a browser would see in a URL attribute, after decoding and dropping blanks and controls. */
export function urlScheme(value: string): string | null {
  const compact = decodeEntities(value)
    // eslint-disable-next-line no-control-regex -- a browser drops these before reading a scheme
    .replace(/[\u0000-\u0020\u007f-\u009f]/g, '')
    .toLowerCase()
  const m = /^([a-z][a-z0-9+.-]*):/.exec(compact)
  return m ? (m[1] as string) : null
}
