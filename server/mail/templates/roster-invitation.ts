import { SIGNATURE_HTML, SIGNATURE_TEXT, escapeHtml, type MailCourse, type MailText } from './layout'

const roleWords = (role: 'student' | 'ta') => (role === 'ta' ? 'a teaching assistant' : 'a student')

/** To a person a roster import created: a one-time link to choose a password. */
export function rosterInvitationMail(p: {
  name: string
  course: MailCourse
  role: 'student' | 'ta'
  link: string
  /** When the link stops working, in the course's zone. */
  expires: string
}): MailText {
  const as = roleWords(p.role)
  return {
    subject: `${p.course.code}: choose your Isentrope password`,
    textBody: [
      `Hello ${p.name},`,
      '',
      `You have been added to ${p.course.code} ${p.course.title} on Isentrope as ${as}.`,
      'Choose a password to sign in:',
      '',
      `  ${p.link}`,
      '',
      `The link works once, until ${p.expires}. If it has expired, ask your instructor for a new one.`,
      '',
      SIGNATURE_TEXT,
    ].join('\n'),
    htmlBody: `<p>Hello ${escapeHtml(p.name)},</p>
<p>You have been added to <strong>${escapeHtml(p.course.code)} ${escapeHtml(p.course.title)}</strong> on Isentrope as ${as}.</p>
<p><a href="${escapeHtml(p.link)}">Choose your password</a></p>
<p>The link works once, until ${escapeHtml(p.expires)}. If it has expired, ask your instructor for a new one.</p>
${SIGNATURE_HTML}`,
  }
}

/** To a person who already has an account and was added to a course by a roster import. */
export function rosterAddedMail(p: {
  name: string
  course: MailCourse
  role: 'student' | 'ta'
  link: string
}): MailText {
  const as = roleWords(p.role)
  return {
    subject: `${p.course.code}: you have been added to ${p.course.title}`,
    textBody: [
      `Hello ${p.name},`,
      '',
      `You have been added to ${p.course.code} ${p.course.title} on Isentrope as ${as}.`,
      `Sign in with your existing password to open it: ${p.link}`,
      '',
      SIGNATURE_TEXT,
    ].join('\n'),
    htmlBody: `<p>Hello ${escapeHtml(p.name)},</p>
<p>You have been added to <strong>${escapeHtml(p.course.code)} ${escapeHtml(p.course.title)}</strong> on Isentrope as ${as}.</p>
<p><a href="${escapeHtml(p.link)}">Open the course</a> (sign in with your existing password).</p>
${SIGNATURE_HTML}`,
  }
}
