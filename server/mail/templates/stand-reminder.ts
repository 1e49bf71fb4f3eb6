import { SIGNATURE_HTML, SIGNATURE_TEXT, escapeHtml, type MailCourse, type MailText } from './layout'

/** The one line of safety words every stand reminder carries. */
export const STAND_SAFETY_LINE =
  'At the stand, follow the pre-run checklist with your TA or instructor; it supports and does not replace ' +
  'the institution’s safety procedures, which govern.'

/** To each member of a lab group the day before its booked stand session. */
export function standReminderMail(p: {
  name: string
  course: MailCourse
  groupName: string
  sheetTitle: string
  standName: string
  location: string
  /** The session's day and times in the course's zone, in words. */
  when: string
  link: string
}): MailText {
  const where = p.location ? `${p.standName}, ${p.location}` : p.standName
  return {
    subject: `${p.course.code}: stand session tomorrow, ${p.standName}`,
    textBody: [
      `Hello ${p.name},`,
      '',
      `${p.groupName} has a stand session in ${p.course.code} ${p.course.title}:`,
      '',
      `  Stand: ${p.standName}`,
      `  Place: ${p.location || 'as listed for the stand'}`,
      `  Time: ${p.when}`,
      `  For: ${p.sheetTitle}`,
      '',
      STAND_SAFETY_LINE,
      '',
      `Your group's bookings: ${p.link}`,
      '',
      SIGNATURE_TEXT,
    ].join('\n'),
    htmlBody: `<p>Hello ${escapeHtml(p.name)},</p>
<p>${escapeHtml(p.groupName)} has a stand session in <strong>${escapeHtml(p.course.code)} ${escapeHtml(p.course.title)}</strong>:</p>
<p style="font-size:1.15em"><strong>${escapeHtml(where)}</strong><br>${escapeHtml(p.when)}<br>For: ${escapeHtml(p.sheetTitle)}</p>
<p>${escapeHtml(STAND_SAFETY_LINE)}</p>
<p><a href="${escapeHtml(p.link)}">Your group’s bookings</a></p>
${SIGNATURE_HTML}`,
  }
}
