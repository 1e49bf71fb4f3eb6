import { SIGNATURE_HTML, SIGNATURE_TEXT, escapeHtml, type MailText } from './layout'

/** To every student of the course when staff make a module's marks final. */
export function marksFinalMail(p: {
  name: string
  courseCode: string
  sheetTitle: string
  /** When, in the course's zone. */
  when: string
  /** Whether the student has a counted hand-in (the link then opens its result). */
  counted: boolean
  link: string
}): MailText {
  const what = p.counted ? 'See your result' : 'See your marks'
  const body = p.counted
    ? 'Your counted hand-in, its checks and any staff comments are on your result page.'
    : 'There is no marked hand-in of yours for this module.'
  return {
    subject: `${p.courseCode}: marks are final — ${p.sheetTitle}`,
    textBody: [
      `Hello ${p.name},`,
      '',
      `The marks for “${p.sheetTitle}” in ${p.courseCode} were made final on ${p.when}.`,
      body,
      '',
      `${what}: ${p.link}`,
      '',
      SIGNATURE_TEXT,
    ].join('\n'),
    htmlBody: `<p>Hello ${escapeHtml(p.name)},</p>
<p>The marks for <strong>${escapeHtml(p.sheetTitle)}</strong> in ${escapeHtml(p.courseCode)} were made final on ${escapeHtml(p.when)}.</p>
<p>${body}</p>
<p><a href="${escapeHtml(p.link)}">${what}</a></p>
${SIGNATURE_HTML}`,
  }
}
