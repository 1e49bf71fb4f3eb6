/**
 * A staff comment's Markdown as plain paragraphs for print. The Markdown is parsed (markdown-it,
 * raw HTML off, as on the result page) and only the text of its tokens is kept: emphasis, links
 * and code lose their markup, list items get a bullet or their number, a link keeps its address
 * after its words, and any HTML in the source stays visible as the literal text it was typed as.
 * Nothing is ever interpreted as HTML, so nothing in a comment can change the PDF's layout.
 * TeX between dollar signs is kept as written (the PDF has no maths typesetting).
 */
import MarkdownIt from 'markdown-it'

type Token = ReturnType<InstanceType<typeof MarkdownIt>['parse']>[number]

const md = new MarkdownIt({ html: false, linkify: true, typographer: true })

function inlineText(children: Token[] | null): string {
  let out = ''
  let href: string | null = null
  let linkStart = 0
  for (const t of children ?? []) {
    switch (t.type) {
      case 'text':
      case 'code_inline':
        out += t.content
        break
      case 'softbreak':
        out += ' '
        break
      case 'hardbreak':
        out += '\n'
        break
      case 'image':
        out += t.content ? `[image: ${t.content}]` : '[image]'
        break
      case 'link_open':
        href = String(t.attrGet('href') ?? '')
        linkStart = out.length
        break
      case 'link_close':
        // A bare URL already shows its address; a worded link gets it after the words.
        if (href && out.slice(linkStart) !== href && `mailto:${out.slice(linkStart)}` !== href) out += ` (${href})`
        href = null
        break
      default:
        // html_inline cannot occur with html: false; emphasis markers carry no text.
        break
    }
  }
  return out
}

/**
 * @param source - the comment as typed (Markdown)
 * @returns its paragraphs, list items and code blocks, each a string without markup
 * @example
 * markdownToParagraphs('**Good run.** Check the [log](https://x.example/l).\n\n- one\n- two')
 * // → ['Good run. Check the log (https://x.example/l).', '• one', '• two']
 */
export function markdownToParagraphs(source: string): string[] {
  const tokens = md.parse(source, {})
  const out: string[] = []
  const lists: { ordered: boolean; next: number }[] = []
  let prefix = ''
  let quote = 0
  for (const t of tokens) {
    switch (t.type) {
      case 'bullet_list_open':
        lists.push({ ordered: false, next: 1 })
        break
      case 'ordered_list_open':
        lists.push({ ordered: true, next: Number(t.attrGet('start') ?? 1) })
        break
      case 'bullet_list_close':
      case 'ordered_list_close':
        lists.pop()
        break
      case 'list_item_open': {
        const list = lists[lists.length - 1]
        const indent = '   '.repeat(Math.max(0, lists.length - 1))
        prefix = list?.ordered ? `${indent}${list.next++}. ` : `${indent}• `
        break
      }
      case 'blockquote_open':
        quote++
        break
      case 'blockquote_close':
        quote--
        break
      case 'inline': {
        const text = inlineText(t.children).trim()
        if (text) out.push(`${quote ? '“' : ''}${prefix}${text}${quote ? '”' : ''}`)
        prefix = ''
        break
      }
      case 'fence':
      case 'code_block':
      case 'math_block':
        if (t.content.trim()) out.push(t.content.replace(/\n$/, ''))
        break
      case 'hr':
        out.push('—')
        break
      default:
        break
    }
  }
  return out
}
