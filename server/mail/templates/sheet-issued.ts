import { SIGNATURE_HTML, SIGNATURE_TEXT, escapeHtml, type MailCourse, type MailText } from './layout'

/** To every enrolled student when a lab sheet is issued to the class, or an issued one is updated. */
export function sheetIssuedMail(p: {
  name: string
  course: MailCourse
  title: string
  /** The due date in the course's zone, or null. */
  due: string | null
  link: string
  update: boolean
}): MailText {
  const what = p.update ? 'An updated lab module has been' : 'A new lab module has been'
  const dueLine = p.due ? `Due: ${p.due}` : 'No due date.'
  return {
    subject: `${p.course.code}: ${p.update ? 'updated' : 'new'} lab module “${p.title}”`,
    textBody: [
      `Hello ${p.name},`,
      '',
      `${what} issued to the class in ${p.course.code} ${p.course.title}:`,
      '',
      `  ${p.title}`,
      `  ${dueLine}`,
      '',
      `Read it here: ${p.link}`,
      '',
      SIGNATURE_TEXT,
    ].join('\n'),
    htmlBody: `<p>Hello ${escapeHtml(p.name)},</p>
<p>${what} issued to the class in <strong>${escapeHtml(p.course.code)} ${escapeHtml(p.course.title)}</strong>:</p>
<p style="font-size:1.15em"><strong>${escapeHtml(p.title)}</strong><br>${escapeHtml(dueLine)}</p>
<p><a href="${escapeHtml(p.link)}">Open the module</a></p>
${SIGNATURE_HTML}`,
  }
}
