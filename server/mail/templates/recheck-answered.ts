import { SIGNATURE_HTML, SIGNATURE_TEXT, escapeHtml, type MailText } from './layout'

/** To the student who asked for a re-check, with the staff answer. */
export function recheckAnsweredMail(p: {
  name: string
  courseCode: string
  sheetTitle: string
  attempt: number
  /** Who answered. */
  by: string
  /** The answer as written (Markdown) for the text part. */
  answer: string
  /** The answer rendered and sanitised, for the HTML part. */
  answerHtml: string
  link: string
}): MailText {
  return {
    subject: `${p.courseCode}: your re-check request was answered — ${p.sheetTitle}`,
    textBody: [
      `Hello ${p.name},`,
      '',
      `${p.by} answered your re-check request on “${p.sheetTitle}” (attempt ${p.attempt}):`,
      '',
      p.answer,
      '',
      `See your result: ${p.link}`,
      '',
      SIGNATURE_TEXT,
    ].join('\n'),
    htmlBody: `<p>Hello ${escapeHtml(p.name)},</p>
<p>${escapeHtml(p.by)} answered your re-check request on <strong>${escapeHtml(p.sheetTitle)}</strong> (attempt ${p.attempt}):</p>
<div>${p.answerHtml}</div>
<p><a href="${escapeHtml(p.link)}">See your result</a></p>
${SIGNATURE_HTML}`,
  }
}
