import katex from 'katex'
import { describe, expect, it } from 'vitest'
import { MAX_FORMULAS, lintModuleBody, renderModule } from '../../../shared/modules/render'
import { decodeEntities, scanTags, urlScheme } from './html-scan'
import { MARKDOWN_PAYLOADS } from './xss-payloads'

const FORBIDDEN_TAGS = new Set([
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
  'foreignobject',
  'use',
  'animate',
  'set',
  'maction',
  'image',
  'video',
  'audio',
])
const URL_ATTRIBUTES = new Set(['href', 'src', 'xlink:href', 'action', 'formaction', 'cite', 'background', 'poster'])

/** Everything that must never be in rendered module HTML, checked on the parsed tags. */
function expectHarmless(html: string): void {
  expect(html).not.toMatch(/<script/i)
  for (const tag of scanTags(html)) {
    expect(FORBIDDEN_TAGS.has(tag.name), `tag <${tag.name}>`).toBe(false)
    for (const [name, value] of Object.entries(tag.attributes)) {
      expect(name.startsWith('on'), `event handler ${name} on <${tag.name}>`).toBe(false)
      expect(name === 'id' || name === 'srcdoc' || name === 'formaction', `attribute ${name}`).toBe(false)
      if (URL_ATTRIBUTES.has(name)) {
        const scheme = urlScheme(value)
        expect(scheme === null || ['http', 'https', 'mailto'].includes(scheme), `${name}="${value}"`).toBe(true)
      }
      if (name === 'style') {
        expect(value).not.toMatch(/url\(|expression\(|javascript:|position:\s*fixed|@import/i)
      }
      expect(value.replace(/\s/g, '').toLowerCase(), `${name} on <${tag.name}>`).not.toContain('javascript:')
    }
  }
}

describe('renderModule: XSS payloads', () => {
  it.each(MARKDOWN_PAYLOADS)('%s leaves nothing that runs', (_name, markdown) => {
    expectHarmless(renderModule(markdown))
  })

  it('shows raw HTML in the Markdown as text instead of dropping it', () => {
    const html = renderModule('Use <b>bold</b> sparingly.')
    expect(html).toContain('&lt;b&gt;bold&lt;/b&gt;')
    expect(scanTags(html).map((t) => t.name)).toEqual(['p'])
  })

  it('keeps a javascript: link as plain text, not as a link', () => {
    const html = renderModule('[x](javascript:alert(1))')
    expect(scanTags(html).some((t) => t.name === 'a')).toBe(false)
  })

  it('makes KaTeX refuse \\href and \\htmlStyle rather than render them', () => {
    const html = renderModule('$\\href{https://example.org}{x}$ and $\\htmlStyle{color:red}{y}$')
    expect(scanTags(html).some((t) => t.name === 'a')).toBe(false)
    expect(html).toContain('#cc0000')
  })
})

describe('renderModule: links', () => {
  it('keeps http, https, mailto and relative links, and marks external ones nofollow', () => {
    const html = renderModule(
      '[a](https://example.org/x) [b](mailto:lab@calder-ridge.example) [c](/courses/1/modules/2) [d](#top)',
    )
    const links = scanTags(html).filter((t) => t.name === 'a')
    expect(links.map((l) => l.attributes.href)).toEqual([
      'https://example.org/x',
      'mailto:lab@calder-ridge.example',
      '/courses/1/modules/2',
      '#top',
    ])
    expect(links[0]?.attributes.rel).toBe('nofollow noopener noreferrer')
    expect(links[2]?.attributes.rel).toBeUndefined()
  })

  it('turns a bare URL into a link', () => {
    const links = scanTags(renderModule('See https://example.org/nozzles for more.')).filter((t) => t.name === 'a')
    expect(links[0]?.attributes.href).toBe('https://example.org/nozzles')
  })
})

describe('renderModule: equations', () => {
  it('renders inline and display TeX with KaTeX, as HTML and MathML', () => {
    const html = renderModule(
      'Inline $M = u/a$ and display:\n\n$$\\frac{p_0}{p} = \\left(1 + \\frac{\\gamma-1}{2}M^2\\right)^{\\frac{\\gamma}{\\gamma-1}}$$',
    )
    expect(html).toContain('class="katex"')
    expect(html).toContain('class="katex-display"')
    expect(html).toContain('<math xmlns="http://www.w3.org/1998/Math/MathML"')
    expect(html).toContain('<annotation encoding="application/x-tex">M = u/a</annotation>')
    expect(html).toContain('<mfrac>')
  })

  it('keeps all of KaTeX’s markup for roots, stretchy arrows, matrices, colour and boxes', () => {
    const tex = String.raw`\sqrt[3]{x} + \overrightarrow{AB} + \widehat{abc} + \begin{pmatrix}1&2\\3&4\end{pmatrix} + \color{blue}{y} + \fcolorbox{red}{yellow}{z} + \cancel{w} + \underbrace{a+b}_{c} + \xrightarrow{k}`
    const direct = katex.renderToString(tex, {
      displayMode: true,
      output: 'htmlAndMathml',
      throwOnError: false,
      trust: false,
      strict: 'ignore',
    })
    const rendered = renderModule(`$$${tex}$$`)
    const count = (html: string, pattern: RegExp) => (html.match(pattern) ?? []).length
    for (const pattern of [/<span/g, /<svg/g, /<path/g, /<line/g, /<math/g, /<mtable/g, /<menclose/g, / style="/g]) {
      expect(count(rendered, pattern), String(pattern)).toBe(count(direct, pattern))
    }
  })

  it('shows a TeX mistake inline instead of failing the page', () => {
    const html = renderModule('Broken $\\frac{1}{$ here, fine $x$ there.')
    expect(html).toContain('katex-error')
    expect(html).toContain('class="katex"')
  })

  it('typesets at most MAX_FORMULAS formulas and shows the rest as TeX source', () => {
    const body = Array.from({ length: MAX_FORMULAS + 2 }, (_, i) => `$y_{${i}}$`).join(' ')
    const html = renderModule(body)
    expect((html.match(/class="katex"/g) ?? []).length).toBe(MAX_FORMULAS)
    expect(html).toContain(`<code>y_{${MAX_FORMULAS + 1}}</code>`)
    const issues = lintModuleBody(body)
    expect(issues).toHaveLength(1)
    expect(issues[0]?.message).toContain(`more than ${MAX_FORMULAS} formulas`)
  })

  it('does not carry macro definitions from one render into the next', () => {
    renderModule('$\\gdef\\leak{4242}\\leak$')
    const html = renderModule('$\\leak$')
    expect(html).not.toContain('4242')
  })
})

describe('renderModule: calculator blocks', () => {
  function calculatorDivs(html: string) {
    return scanTags(html).filter((t) => t.name === 'div' && t.attributes.class === 'isentrope-calculator')
  }

  it('turns a calculator block into the placeholder with its kind and its defaults as JSON', () => {
    const html = renderModule(
      '```calculator nozzle\nchamberPressure: 500\nchamberPressureUnit: kPa\nlabel: "a \\"quoted\\" <b>"\nshowChart: true\n```',
    )
    const [div] = calculatorDivs(html)
    expect(div?.attributes['data-kind']).toBe('nozzle')
    expect(JSON.parse(div?.attributes['data-defaults'] ?? '')).toEqual({
      chamberPressure: 500,
      chamberPressureUnit: 'kPa',
      label: 'a "quoted" <b>',
      showChart: true,
    })
    expect(html).toContain('></div>')
  })

  it('accepts every calculator kind and an empty block', () => {
    for (const kind of ['isentropic', 'normal-shock', 'nozzle', 'blowdown', 'combustion']) {
      const [div] = calculatorDivs(renderModule(`\`\`\`calculator ${kind}\n\`\`\``))
      expect(div?.attributes['data-kind']).toBe(kind)
      expect(div?.attributes['data-defaults']).toBe('{}')
    }
  })

  it('shows an unknown kind or unreadable inputs as a visible error box, not a calculator', () => {
    for (const block of [
      '```calculator warp-drive\nspeed: 9\n```',
      '```calculator nozzle\nchamberPressure: [1, 2\n```',
      '```calculator nozzle\n- 1\n- 2\n```',
      '```calculator nozzle\nchamberPressure: { nested: 1 }\n```',
    ]) {
      const html = renderModule(block)
      expect(calculatorDivs(html)).toEqual([])
      const box = scanTags(html).find((t) => t.name === 'div')
      expect(box?.attributes.class, block).toBe('isentrope-module-error')
    }
  })

  it('leaves ordinary code blocks as code', () => {
    const html = renderModule('```python\nprint(1)\n```')
    expect(html).toContain('<pre><code class="language-python">print(1)\n</code></pre>')
  })
})

describe('renderModule: determinism and plain Markdown', () => {
  const sample =
    '# Nozzle\n\n"Quotes" -- and $p_0$.\n\n| a | b |\n|--:|:-:|\n| 1 | 2 |\n\n```calculator isentropic\nmach: 2\n```\n'

  it('gives identical output for identical input, also after rendering something else', () => {
    const first = renderModule(sample)
    renderModule('$$\\sqrt{2}$$ [x](https://example.org)')
    expect(renderModule(sample)).toBe(first)
  })

  it('keeps tables with their column alignment, and typographic quotes', () => {
    const html = renderModule(sample)
    expect(html).toContain('<th style="text-align:right">a</th>')
    expect(html).toContain('\u201cQuotes\u201d')
  })
})

describe('lintModuleBody', () => {
  it('reports a bad calculator block and TeX errors with their lines', () => {
    const body = [
      '# Title',
      '',
      'Fine $x$.',
      '',
      '```calculator warp',
      'x: 1',
      '```',
      '',
      'Broken $\\frac{1}{$.',
      '',
      '$$\\nosuchmacro$$',
    ].join('\n')
    const issues = lintModuleBody(body)
    expect(issues.map((i) => i.line)).toEqual([5, 9, 11])
    expect(issues[0]?.message).toContain('no calculator "warp"')
    expect(issues[1]?.message).toContain('TeX error')
    expect(issues[2]?.message).toContain('\\nosuchmacro')
    expect(issues.every((i) => i.path === 'body')).toBe(true)
  })

  it('finds nothing wrong in a clean body', () => {
    expect(lintModuleBody('Text $a^2 + b^2$.\n\n```calculator nozzle\nthroatDiameter: 4\n```\n')).toEqual([])
  })
})

describe('the harmlessness check used above', () => {
  // The XSS tests are only as good as this check: show that it catches each kind of danger.
  it.each([
    ['a script tag', '<p><script>alert(1)</script></p>'],
    ['an event handler', '<img src="x.png" onerror="alert(1)">'],
    ['a javascript: link', '<a href="javascript:alert(1)">x</a>'],
    ['an entity-encoded javascript: link', '<a href="java&#x73;cript&colon;alert(1)">x</a>'],
    ['a data: image', '<img src="data:image/png;base64,AAAA">'],
    ['a fixed-position style', '<span style="position:fixed;top:0">x</span>'],
    ['an iframe', '<iframe src="https://example.org"></iframe>'],
    ['an id', '<span id="login">x</span>'],
  ])('fails on %s', (_name, html) => {
    expect(() => expectHarmless(html)).toThrow()
  })

  it('decodes the entities it checks the same way a browser would', () => {
    expect(decodeEntities('java&#x73;cript&colon;')).toBe('javascript:')
    expect(urlScheme(' JAVA\tSCRIPT:x')).toBe('javascript')
  })
})

describe('heading levels', () => {
  it('moves module headings one level down so the page keeps a single h1', () => {
    const html = renderModule('# Title\n\n## Part\n\n###### Deep\n')
    expect(html).toContain('<h2>Title</h2>')
    expect(html).toContain('<h3>Part</h3>')
    expect(html).toContain('<h6>Deep</h6>')
    expect(html).not.toContain('<h1')
  })
})
