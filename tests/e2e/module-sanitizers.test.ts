import { readFileSync, readdirSync } from 'node:fs'
import { fileURLToPath } from 'node:url'
import type { Page } from 'playwright-core'
import { build } from 'vite'
import type { Rolldown } from 'vite'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { currentDueDates } from '../../scripts/demo/seed-demo'
import { parseModuleSource } from '../../shared/modules/front-matter'
import { renderModule, sanitizeModuleHtml } from '../../shared/modules/render'
import { launchBrowser } from '../helpers/browser'
import { HTML_PAYLOADS, MARKDOWN_PAYLOADS } from '../unit/modules/xss-payloads'

/**
 * Both sanitisers of module HTML against the one payload list: sanitize-html as the server runs
 * it, and DOMPurify as the page runs it (src/components/module/module-html.ts, bundled for this
 * test and run in Chromium). Each output is parsed by Chromium and every element and attribute it
 * would create is checked, so what counts is what a browser would make of the HTML, not its text.
 */

interface Seen {
  name: string
  namespace: string
  attributes: Record<string, string>
}

declare global {
  interface Window {
    ModuleHtml: { sanitizeModuleHtml: (html: string) => string }
  }
}

const root = fileURLToPath(new URL('../..', import.meta.url))
let page: Page
let closeBrowser: () => Promise<void>

beforeAll(async () => {
  // The page's own sanitiser module, bundled as a script that sets window.ModuleHtml.
  const out = (await build({
    root,
    configFile: false,
    logLevel: 'silent',
    resolve: { alias: { '@shared': `${root}shared` } },
    build: {
      write: false,
      minify: false,
      lib: { entry: `${root}src/components/module/module-html.ts`, formats: ['iife'], name: 'ModuleHtml' },
    },
  })) as Rolldown.RolldownOutput | Rolldown.RolldownOutput[]
  const chunk = (Array.isArray(out) ? out[0]! : out).output[0]
  const b = await launchBrowser()
  closeBrowser = b.close
  page = await b.browser.newPage()
  await page.setContent('<!doctype html><title>sanitisers</title>')
  await page.addScriptTag({ content: chunk.code })
})
afterAll(async () => {
  await closeBrowser?.()
})

/** What Chromium builds from the HTML: every element with its namespace and attributes. */
function parsedByBrowser(html: string): Promise<Seen[]> {
  return page.evaluate((markup) => {
    const t = document.createElement('template')
    t.innerHTML = markup
    return Array.from(t.content.querySelectorAll('*')).map((el) => ({
      name: el.localName,
      namespace: el.namespaceURI ?? '',
      attributes: Object.fromEntries(Array.from(el.attributes).map((a) => [a.name.toLowerCase(), a.value])),
    }))
  }, html)
}

const purify = (html: string) => page.evaluate((markup) => window.ModuleHtml.sanitizeModuleHtml(markup), html)

const FORBIDDEN = new Set([
  'script',
  'style',
  'iframe',
  'frame',
  'object',
  'embed',
  'form',
  'input',
  'button',
  'textarea',
  'select',
  'link',
  'meta',
  'base',
  'template',
  'noscript',
  'title',
  'foreignobject',
  'use',
  'animate',
  'set',
  'maction',
  'mglyph',
  'image',
  'video',
  'audio',
])
const URL_ATTRIBUTES = new Set(['href', 'src', 'xlink:href', 'action', 'formaction', 'cite', 'srcset', 'data'])

/** The scheme a browser reads from a URL (blanks and controls dropped), or null for a relative one. */
function scheme(url: string): string | null {
  // eslint-disable-next-line no-control-regex -- a browser drops these before reading a scheme
  const m = /^([a-z][a-z0-9+.-]*):/i.exec(url.replace(/[\u0000-\u0020\u007f-\u009f]/g, ''))
  return m ? (m[1] as string).toLowerCase() : null
}

async function expectHarmless(html: string, what: string): Promise<void> {
  for (const el of await parsedByBrowser(html)) {
    expect(FORBIDDEN.has(el.name), `${what}: <${el.name}>`).toBe(false)
    for (const [name, value] of Object.entries(el.attributes)) {
      expect(name.startsWith('on'), `${what}: ${name} on <${el.name}>`).toBe(false)
      expect(['id', 'name', 'srcdoc', 'formaction', 'srcset'].includes(name), `${what}: ${name}`).toBe(false)
      if (URL_ATTRIBUTES.has(name)) {
        // eslint-disable-next-line no-control-regex -- a browser drops leading blanks and controls
        expect(value.replace(/^[\s\u0000-\u001f]+/, ''), `${what}: ${name}="${value}"`).not.toMatch(/^[/\\]{2}/)
        const s = scheme(value)
        expect(s === null || ['http', 'https', 'mailto'].includes(s), `${what}: ${name}="${value}"`).toBe(true)
      }
      if (name === 'style') {
        expect(value, `${what}: style`).not.toMatch(/url\(|expression\(|javascript:|position:\s*fixed|@import|\\/i)
      }
      if (name === 'class' && el.name === 'div') {
        expect(
          value.split(/\s+/).every((c) => c.startsWith('isentrope-')),
          `${what}: class="${value}"`,
        ).toBe(true)
      }
      if (name.startsWith('data-')) expect(['data-kind', 'data-defaults'], `${what}: ${name}`).toContain(name)
    }
  }
}

describe('the server and the browser sanitiser keep nothing that runs', () => {
  it.each(HTML_PAYLOADS)('raw HTML: %s', async (name, html) => {
    await expectHarmless(sanitizeModuleHtml(html), `server, ${name}`)
    await expectHarmless(await purify(html), `browser, ${name}`)
  })

  it.each(MARKDOWN_PAYLOADS)('Markdown rendered on the server, then again in the browser: %s', async (name, md) => {
    const stored = renderModule(md)
    await expectHarmless(stored, `server, ${name}`)
    await expectHarmless(await purify(stored), `browser, ${name}`)
  })
})

describe('the browser sanitiser removes nothing the server kept', () => {
  // The same allow-list on both sides: the server's rendering of every demo module, KaTeX, MathML,
  // SVG, tables, links and calculator placeholders included, passes DOMPurify unchanged.
  const dir = new URL('../../content/', import.meta.url)
  const files = readdirSync(dir).filter((f) => f.endsWith('.md'))

  it.each(files)('%s', async (file) => {
    const parsed = parseModuleSource(currentDueDates(readFileSync(new URL(file, dir), 'utf8')), file)
    expect(parsed.body).toBeTruthy()
    const stored = renderModule(parsed.body ?? '')
    expect(stored).toContain('katex')
    expect(await parsedByBrowser(await purify(stored))).toEqual(await parsedByBrowser(stored))
  })

  it('keeps KaTeX styles, link rels, table alignment and calculator data, and drops what the list does not name', async () => {
    const html = [
      '<p><a href="https://example.org/x" rel="opener">out</a> <a href="/courses/1" rel="opener">in</a></p>',
      '<table><tr><th style="text-align:right">a</th><td style="text-align:center;color:red">b</td></tr></table>',
      '<span class="katex" style="height:0.6444em;vertical-align:-0.25em;position:fixed">x</span>',
      '<div class="isentrope-calculator other" data-kind="nozzle" data-defaults="{&quot;a&quot;:1}"></div>',
      '<code class="language-js x">y</code>',
    ].join('')
    const server = await parsedByBrowser(sanitizeModuleHtml(html))
    const browser = await parsedByBrowser(await purify(html))
    const expected = [
      { name: 'p', attributes: {} },
      { name: 'a', attributes: { href: 'https://example.org/x', rel: 'nofollow noopener noreferrer' } },
      { name: 'a', attributes: { href: '/courses/1' } },
      { name: 'table', attributes: {} },
      { name: 'tbody', attributes: {} },
      { name: 'tr', attributes: {} },
      { name: 'th', attributes: { style: 'text-align: right;' } },
      { name: 'td', attributes: { style: 'text-align: center;' } },
      { name: 'span', attributes: { class: 'katex', style: 'height: 0.6444em; vertical-align: -0.25em;' } },
      { name: 'div', attributes: { class: 'isentrope-calculator', 'data-kind': 'nozzle', 'data-defaults': '{"a":1}' } },
      { name: 'code', attributes: { class: 'language-js' } },
    ]
    // Compare what the browser reads from each style, not how each sanitiser spells it.
    const normalised = (seen: Seen[]) =>
      page.evaluate(
        (list) =>
          list.map((el) => {
            const attributes = { ...el.attributes }
            if (attributes.style !== undefined) {
              const probe = document.createElement('span')
              probe.setAttribute('style', attributes.style)
              attributes.style = probe.style.cssText
            }
            return { name: el.name, attributes }
          }),
        seen,
      )
    expect(await normalised(server)).toEqual(expected)
    expect(await normalised(browser)).toEqual(expected)
  })
})
