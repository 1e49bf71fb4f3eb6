import { SIGNATURE_HTML, SIGNATURE_TEXT, escapeHtml, type MailText } from './layout'

/** The receipt for a hand-in, once it has been checked: to the submitter, or to the whole lab group. */
export function handInReceivedMail(p: {
  name: string
  courseCode: string
  sheetTitle: string
  /** The lab group's name when the group handed in together. */
  groupName: string | null
  attempt: number
  attemptsAllowed: number
  /** When it arrived, in the course's zone. */
  when: string
  daysLate: number | null
  /** The score, or why there is none to show. */
  scoreLine: string
  link: string
}): MailText {
  const whose = p.groupName ? `${p.groupName}'s` : 'your'
  const late = p.daysLate !== null ? `, ${p.daysLate} day(s) after the due date` : ''
  return {
    subject: `${p.courseCode}: hand-in received — ${p.sheetTitle} (attempt ${p.attempt})`,
    textBody: [
      `Hello ${p.name},`,
      '',
      `Isentrope received ${whose} hand-in for “${p.sheetTitle}” (attempt ${p.attempt} of ${p.attemptsAllowed}) on ${p.when}${late}.`,
      p.scoreLine,
      '',
      `See the checks: ${p.link}`,
      '',
      SIGNATURE_TEXT,
    ].join('\n'),
    htmlBody: `<p>Hello ${escapeHtml(p.name)},</p>
<p>Isentrope received ${escapeHtml(whose)} hand-in for <strong>${escapeHtml(p.sheetTitle)}</strong> (attempt ${p.attempt} of ${p.attemptsAllowed}) on ${escapeHtml(p.when)}${escapeHtml(late)}.</p>
<p>${escapeHtml(p.scoreLine)}</p>
<p><a href="${escapeHtml(p.link)}">See the checks</a></p>
${SIGNATURE_HTML}`,
  }
}
