import { describe, expect, it } from 'vitest'
import { parseModuleSource } from '../../shared/modules/front-matter'
import { parseRosterCsv } from '../../shared/roster/import-csv'
import { LabGroupCreateSchema, SectionCreateSchema, SectionUpdateSchema } from '../../shared/schemas/course-admin'
import { CreateCourseSchema } from '../../shared/schemas/courses'
import { singleLineName, singleLineProblem } from '../../shared/schemas/names'

const Title = singleLineName({ field: 'title', min: 3, max: 200 })
const messagesOf = (r: { success: boolean; error?: { issues: { message: string }[] } }) =>
  r.success ? [] : r.error!.issues.map((i) => i.message)

describe('singleLineName: one line of ordinary text', () => {
  it('accepts names in any script, with accents, emoji and joiners, and trims the ends', () => {
    for (const name of [
      'Düsentrieb-Müller',
      'Øster Ålund',
      '東京工業大学 推進研究室',
      'Ελένη Παπαδοπούλου',
      'محمد عبد الله',
      'नमस्ते',
      '👩‍🚀 Lab crew',
      'O’Brien, “Ace”',
      'Section A/B – 10:00',
    ]) {
      expect(Title.safeParse(name).success, name).toBe(true)
    }
    expect(Title.parse('  Nozzle flow \n')).toBe('Nozzle flow')
  })

  it('refuses a line feed and a carriage return inside, naming the field and where', () => {
    expect(messagesOf(Title.safeParse('Nozzle\nflow'))).toEqual([
      'The title must be one line of plain text, but it contains a line break at character 7.',
    ])
    expect(messagesOf(Title.safeParse('Nozzle\r\nflow'))[0]).toContain('carriage return')
  })

  it('refuses tab, NUL, escape, DEL, C1 controls, line and paragraph separators, and direction overrides', () => {
    const cases: [string, RegExp][] = [
      ['Lab\tone', /a tab at character 4/],
      ['Lab\u0000one', /control character U\+0000/],
      ['Lab\u001b[31mone', /control character U\+001B/],
      ['Lab\u007fone', /control character U\+007F/],
      ['Lab\u0085one', /control character U\+0085/],
      ['Lab\u2028one', /line separator/],
      ['Lab\u2029one', /paragraph separator/],
      ['Lab\u202eeno', /text-direction control \(U\+202E\)/],
      ['Lab\u2066one', /text-direction control \(U\+2066\)/],
    ]
    for (const [text, pattern] of cases) {
      const messages = messagesOf(Title.safeParse(text))
      expect(messages.join(' '), JSON.stringify(text)).toMatch(pattern)
      expect(messages.join(' ')).toContain('The title')
    }
  })

  it('keeps its length limits and their messages', () => {
    const Name = singleLineName({ field: 'section name', max: 5, messages: { tooLong: 'name: at most 5 characters.' } })
    expect(messagesOf(Name.safeParse('   '))).toEqual(['The section name must not be empty.'])
    expect(messagesOf(Name.safeParse('abcdef'))).toEqual(['name: at most 5 characters.'])
  })

  it('singleLineProblem says nothing for clean text', () => {
    expect(singleLineProblem('Cold flow, run 3 (ø 4 mm)')).toBeNull()
  })
})

describe('every title and name field uses it', () => {
  const course = {
    code: 'AE 4410',
    title: 'Propulsion lab',
    term: 'Spring',
    institution: 'Test University',
    timeZone: 'UTC',
  }

  it('course code, title, term and institution', () => {
    for (const field of ['code', 'title', 'term', 'institution'] as const) {
      const r = CreateCourseSchema.safeParse({ ...course, [field]: `${course[field]}\r\nBcc: x@example.com` })
      expect(r.success, field).toBe(false)
      expect(r.error!.issues[0]!.path).toEqual([field])
      expect(r.error!.issues[0]!.message).toMatch(/must be one line of plain text/)
    }
    expect(CreateCourseSchema.safeParse(course).success).toBe(true)
  })

  it('section and lab-group names, when created and when renamed', () => {
    expect(messagesOf(SectionCreateSchema.safeParse({ name: 'A\n01' }))[0]).toContain('The section name')
    expect(messagesOf(SectionUpdateSchema.safeParse({ name: 'A\u000701' }))[0]).toContain('The section name')
    expect(messagesOf(LabGroupCreateSchema.safeParse({ name: 'G\u202e1' }))[0]).toContain('The lab-group name')
    expect(SectionCreateSchema.parse({ name: 'Abschnitt Ü' }).name).toBe('Abschnitt Ü')
  })

  it('module titles and labels in the front matter', () => {
    const parsed = parseModuleSource(
      [
        '---',
        'title: "Nozzle\\nflow"',
        'assignment:',
        '  tables:',
        '    - key: run',
        '      label: "Run\\tlog"',
        '      columns:',
        '        - { key: t, label: Time, unit: s }',
        '---',
        'Body',
      ].join('\n'),
      'nozzle',
    )
    expect(parsed.ok).toBe(false)
    if (parsed.ok) return
    expect(parsed.errors.map((e) => e.path)).toEqual(['title', 'assignment.tables[0].label'])
    expect(parsed.errors[0]!.message).toContain(
      'The title must be one line of plain text, but it contains a line break',
    )
    expect(parsed.errors[1]!.message).toContain('The label must be one line of plain text, but it contains a tab')
  })

  it('display names, sections and groups of a roster import', () => {
    const csv =
      'email,name,section,group\na@x.example,Eluned\u001b[2J Marrowby,A,G1\nb@x.example,Bryn Lowmoor,A\u0000,G1\nc@x.example,Cade Nettlefold,A,"G\n1"\nd@x.example,"Dilys\nNettlefold",A,G1\n'
    const parsed = parseRosterCsv(csv)
    expect(parsed.ok).toBe(true)
    if (!parsed.ok) return
    const problems = parsed.rows.map((r) => r.problems.map((p) => `${p.column}: ${p.message}`))
    expect(problems[0]!.join(' ')).toMatch(
      /^name: name: a display name is one line of plain text; this one contains the control character U\+001B/,
    )
    expect(problems[1]!.join(' ')).toMatch(/^section: section: .*U\+0000/)
    expect(problems[2]!.join(' ')).toMatch(/^group: group: .*a line break/)
    // A line break inside a quoted name cell has always been read as a space.
    expect(parsed.rows[3]!.displayName).toBe('Dilys Nettlefold')
    expect(problems[3]).toEqual([])
  })
})
