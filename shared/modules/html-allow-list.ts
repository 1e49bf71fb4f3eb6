/**
 * What module HTML may contain: one allow-list that both sanitisers are built from, sanitize-html on
 * the server (shared/modules/render.ts, on every render that is stored or previewed) and DOMPurify in
 * the browser (src/components/module/module-html.ts, on every module the page shows). Markdown's tags,
 * KaTeX's HTML, MathML and SVG, and the calculator placeholder; links only http, https, mailto or
 * relative; styles only the few properties KaTeX writes, each value matched in full.
 * Tested against one list of XSS payloads on both sides (tests/unit/modules/sanitizers.test.ts).
 */

// CSS values KaTeX writes into style attributes: lengths, colours, and a few keywords.
const NUMBER = String.raw`-?(?:\d+(?:\.\d+)?|\.\d+)`
const LENGTH = new RegExp(String.raw`^${NUMBER}(?:em|ex|px|pt|mu|%)?$`)
const LENGTHS = new RegExp(String.raw`^${NUMBER}(?:em|ex|px|pt|mu|%)?(?:\s+${NUMBER}(?:em|ex|px|pt|mu|%)?){0,3}$`)
const WIDTH = new RegExp(String.raw`^(?:${NUMBER}(?:em|ex|px|pt|mu|%)?|calc\(100% - ${NUMBER}em\))$`)
const COLOR =
  /^(?:#[0-9a-fA-F]{3,8}|[a-zA-Z]{1,30}|rgba?\(\s*[\d.]+%?\s*,\s*[\d.]+%?\s*,\s*[\d.]+%?\s*(?:,\s*[\d.]+\s*)?\))$/
const BORDER_STYLE = /^(?:solid|dashed|dotted|none)$/
const BORDER = new RegExp(
  String.raw`^${NUMBER}(?:em|ex|px|pt)?\s+(?:solid|dashed|dotted)(?:\s+(?:#[0-9a-fA-F]{3,8}|[a-zA-Z]{1,30}))?$`,
)

const KATEX_STYLES: Record<string, RegExp[]> = {
  'background-color': [COLOR],
  border: [BORDER],
  'border-bottom-width': [LENGTH],
  'border-color': [COLOR],
  'border-right-style': [BORDER_STYLE],
  'border-right-width': [LENGTH],
  'border-style': [BORDER_STYLE],
  'border-top-width': [LENGTH],
  'border-width': [LENGTH],
  bottom: [LENGTH],
  color: [COLOR],
  height: [LENGTH],
  left: [LENGTH],
  margin: [LENGTHS],
  'margin-left': [LENGTH],
  'margin-right': [LENGTH],
  'margin-top': [LENGTH],
  'min-width': [LENGTH],
  'padding-left': [LENGTH],
  position: [/^relative$/],
  'text-shadow': [LENGTHS],
  top: [LENGTH],
  'vertical-align': [LENGTH],
  width: [WIDTH],
}

const MATHML_TAGS: readonly string[] = [
  'math',
  'semantics',
  'annotation',
  'mrow',
  'mi',
  'mo',
  'mn',
  'ms',
  'mtext',
  'mspace',
  'msup',
  'msub',
  'msubsup',
  'mfrac',
  'msqrt',
  'mroot',
  'mover',
  'munder',
  'munderover',
  'mtable',
  'mtr',
  'mtd',
  'mlabeledtr',
  'mpadded',
  'mphantom',
  'mstyle',
  'menclose',
]

// Presentation attributes only; no href (a link on any MathML element in some browsers).
const MATHML_ATTRIBUTES: readonly string[] = [
  'mathvariant',
  'mathcolor',
  'mathbackground',
  'mathsize',
  'displaystyle',
  'scriptlevel',
  'stretchy',
  'fence',
  'separator',
  'lspace',
  'rspace',
  'minsize',
  'maxsize',
  'symmetric',
  'largeop',
  'movablelimits',
  'form',
  'accent',
  'accentunder',
  'linethickness',
  'columnalign',
  'rowalign',
  'columnspacing',
  'rowspacing',
  'columnlines',
  'rowlines',
  'frame',
  'framespacing',
  'equalrows',
  'equalcolumns',
  'width',
  'height',
  'depth',
  'voffset',
  'notation',
  'linebreak',
]

export interface HtmlAllowList {
  /** Elements kept (lower case); any other element is dropped and its text kept. */
  tags: readonly string[]
  /** Attributes kept on each element (lower case, as an HTML parser reports them). */
  attributes: Readonly<Record<string, readonly string[]>>
  /** Classes kept on an element; `prefix-*` matches by prefix. An element not named here keeps every class. */
  classes: Readonly<Record<string, readonly string[]>>
  /** Style declarations kept on an element: property → patterns one of which the whole value must match. */
  styles: Readonly<Record<string, Readonly<Record<string, readonly RegExp[]>>>>
  /** Schemes a URL attribute may use; a URL without a scheme (relative) is always kept. */
  schemes: readonly string[]
  /** Narrower schemes for some elements. */
  schemesByTag: Readonly<Record<string, readonly string[]>>
  /** The attributes that hold URLs. */
  urlAttributes: readonly string[]
}

const ALIGN = [/^(?:left|right|center)$/]

export const MODULE_HTML: HtmlAllowList = {
  tags: [
    // Markdown
    'p',
    'h1',
    'h2',
    'h3',
    'h4',
    'h5',
    'h6',
    'blockquote',
    'ul',
    'ol',
    'li',
    'strong',
    'em',
    's',
    'del',
    'code',
    'pre',
    'hr',
    'br',
    'a',
    'img',
    'table',
    'thead',
    'tbody',
    'tr',
    'th',
    'td',
    // markdown-it-texmath's wrappers and KaTeX's HTML
    'section',
    'eqn',
    'eq',
    'span',
    // KaTeX's SVG (square roots, stretchy arrows and accents)
    'svg',
    'path',
    'line',
    // the calculator placeholder and inline error boxes
    'div',
    ...MATHML_TAGS,
  ],
  attributes: {
    a: ['href', 'title', 'rel'],
    img: ['src', 'alt', 'title'],
    ol: ['start'],
    th: ['style'],
    td: ['style'],
    code: ['class'],
    span: ['class', 'style', 'aria-hidden', 'title'],
    section: ['class'],
    div: ['class', 'role', 'data-kind', 'data-defaults'],
    svg: ['xmlns', 'width', 'height', 'viewbox', 'preserveaspectratio', 'style'],
    path: ['d'],
    line: ['x1', 'y1', 'x2', 'y2', 'stroke-width'],
    math: ['xmlns', 'display', ...MATHML_ATTRIBUTES],
    annotation: ['encoding'],
    ...Object.fromEntries(
      MATHML_TAGS.filter((t) => t !== 'math' && t !== 'annotation').map((t) => [t, MATHML_ATTRIBUTES]),
    ),
    mpadded: [...MATHML_ATTRIBUTES, 'style'],
    // On any element. Written only by the renderer when the editor's preview asks (raw HTML is off);
    // the preview scrolls to the block of the cursor's line by it.
    '*': ['data-source-line'],
  },
  classes: {
    code: ['language-*'],
    div: ['isentrope-calculator', 'isentrope-module-error'],
    section: ['eqno'],
  },
  styles: {
    span: KATEX_STYLES,
    svg: { width: [WIDTH], height: [LENGTH], 'min-width': [LENGTH] },
    // \fcolorbox draws its frame with a style on <mpadded>.
    mpadded: { border: [BORDER], 'background-color': [COLOR] },
    th: { 'text-align': ALIGN },
    td: { 'text-align': ALIGN },
  },
  schemes: ['http', 'https', 'mailto'],
  schemesByTag: { img: ['http', 'https'] },
  urlAttributes: ['href', 'src', 'cite'],
}

/** rel of a link that leaves the site: no referrer, no ranking credit for whatever a module links to. */
export const EXTERNAL_LINK_REL = 'nofollow noopener noreferrer'

/** Whether a link points off the site (and so gets {@link EXTERNAL_LINK_REL}). */
export function isExternalLink(href: string): boolean {
  return /^https?:/i.test(href)
}

/** Whether `element` may carry the class `name`. */
export function classAllowed(element: string, name: string, list: HtmlAllowList = MODULE_HTML): boolean {
  const allowed = list.classes[element]
  if (!allowed) return true
  return allowed.some((c) => (c.endsWith('*') ? name.startsWith(c.slice(0, -1)) : c === name))
}

/**
 * The declarations of a style attribute that the allow-list keeps on `element`, joined again
 * (`prop:value;prop:value`), or '' when none is kept. A declaration is kept only when its whole
 * value matches one of its property's patterns, so nothing the patterns do not name (url(),
 * expression(), escapes, !important, a second declaration smuggled into a value) can pass.
 */
export function keptStyle(element: string, style: string, list: HtmlAllowList = MODULE_HTML): string {
  const allowed = list.styles[element]
  if (!allowed) return ''
  const kept: string[] = []
  for (const declaration of style.split(';')) {
    const colon = declaration.indexOf(':')
    if (colon < 0) continue
    const property = declaration.slice(0, colon).trim().toLowerCase()
    const value = declaration.slice(colon + 1).trim()
    const patterns = Object.hasOwn(allowed, property) ? allowed[property] : undefined
    if (patterns?.some((p) => p.test(value))) kept.push(`${property}:${value}`)
  }
  return kept.join(';')
}

/**
 * Whether a URL attribute's value may stay on `element`: relative URLs (not protocol-relative
 * `//host`), or a scheme the allow-list names. Blanks and control characters are dropped before
 * the scheme is read, as a browser does.
 */
export function urlAllowed(element: string, url: string, list: HtmlAllowList = MODULE_HTML): boolean {
  // eslint-disable-next-line no-control-regex -- a browser ignores these inside a URL's scheme
  const compact = url.replace(/[\u0000-\u0020\u007f-\u009f]/g, '')
  if (/^[/\\]{2}/.test(compact)) return false
  const scheme = /^([^/?#]*?):/.exec(compact)
  if (!scheme) return true
  const schemes = list.schemesByTag[element] ?? list.schemes
  return schemes.includes((scheme[1] as string).toLowerCase())
}
