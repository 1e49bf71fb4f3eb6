// markdown-it-texmath ships no type declarations; this covers the one call render.ts makes.
declare module 'markdown-it-texmath' {
  import type { MarkdownIt } from 'markdown-it'

  interface TexmathOptions {
    /** The TeX renderer, e.g. KaTeX (an object with renderToString). */
    engine?: { renderToString(tex: string, options?: object): string }
    /** 'dollars' for $…$ inline and $$…$$ display; other sets exist but are not used here. */
    delimiters?: string | string[]
    /** Passed to engine.renderToString. */
    katexOptions?: Record<string, unknown>
  }

  function texmath(md: MarkdownIt, options?: TexmathOptions): void
  export default texmath
}
