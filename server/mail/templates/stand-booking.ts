import { SIGNATURE_HTML, SIGNATURE_TEXT, escapeHtml, type MailText } from './layout'

/** A booking as the mails name it: the sheet, the stand, and when (already in the course's zone). */
interface MailBooking {
  sheetTitle: string
  standName: string
  when: string
}

/** To each member of a lab group whose booking staff cancelled or moved, with the reason given. */
export function bookingChangedMail(p: {
  name: string
  courseCode: string
  groupName: string
  booking: MailBooking
  /** The new time when the booking was moved; absent when it was cancelled. */
  movedTo?: MailBooking
  by: string
  reason: string
  link: string
}): MailText {
  const what = p.movedTo ? 'moved' : 'cancelled'
  const lines = [
    `Hello ${p.name},`,
    '',
    `${p.by} ${what} the stand booking of ${p.groupName} for “${p.booking.sheetTitle}” on ${p.booking.standName}, ${p.booking.when}.`,
    ...(p.movedTo ? ['', `The new time: ${p.movedTo.standName}, ${p.movedTo.when}.`] : []),
    '',
    `Reason: ${p.reason}`,
    '',
    `Your group's stand time: ${p.link}`,
    '',
    SIGNATURE_TEXT,
  ]
  return {
    subject: `${p.courseCode}: stand booking ${what} — ${p.booking.sheetTitle}`,
    textBody: lines.join('\n'),
    htmlBody: `<p>Hello ${escapeHtml(p.name)},</p>
<p>${escapeHtml(p.by)} ${what} the stand booking of ${escapeHtml(p.groupName)} for <strong>${escapeHtml(p.booking.sheetTitle)}</strong> on ${escapeHtml(p.booking.standName)}, ${escapeHtml(p.booking.when)}.</p>
${p.movedTo ? `<p>The new time: <strong>${escapeHtml(p.movedTo.standName)}, ${escapeHtml(p.movedTo.when)}</strong>.</p>\n` : ''}<p>Reason: ${escapeHtml(p.reason)}</p>
<p><a href="${escapeHtml(p.link)}">Your group's stand time</a></p>
${SIGNATURE_HTML}`,
  }
}

/** To each member of the waiting group that got a slot when its holder gave it up. */
export function waitlistBookedMail(p: {
  name: string
  courseCode: string
  groupName: string
  booking: MailBooking
  link: string
}): MailText {
  return {
    subject: `${p.courseCode}: a stand slot you waited for is now booked — ${p.booking.sheetTitle}`,
    textBody: [
      `Hello ${p.name},`,
      '',
      `The slot ${p.groupName} waited for came free and is now booked for your group: “${p.booking.sheetTitle}” on ${p.booking.standName}, ${p.booking.when}.`,
      '',
      `If your group cannot come, cancel it before the cut-off so the next group can have it: ${p.link}`,
      '',
      SIGNATURE_TEXT,
    ].join('\n'),
    htmlBody: `<p>Hello ${escapeHtml(p.name)},</p>
<p>The slot ${escapeHtml(p.groupName)} waited for came free and is now booked for your group: <strong>${escapeHtml(p.booking.sheetTitle)}</strong> on ${escapeHtml(p.booking.standName)}, ${escapeHtml(p.booking.when)}.</p>
<p>If your group cannot come, <a href="${escapeHtml(p.link)}">cancel it before the cut-off</a> so the next group can have it.</p>
${SIGNATURE_HTML}`,
  }
}
