import { SIGNATURE_HTML, SIGNATURE_TEXT, escapeHtml, type MailText } from './layout'

/** One summary per reader of the flags raised since the last one (never one mail per flag). */
export function flagDigestMail(p: {
  name: string
  courseCode: string
  items: { student: string; sheetTitle: string; message: string; link: string }[]
  queueLink: string
}): MailText {
  const n = p.items.length
  return {
    subject: `${p.courseCode}: ${n} new flag${n === 1 ? '' : 's'} to review`,
    textBody: [
      `Hello ${p.name},`,
      '',
      `New flags in ${p.courseCode} since the last summary:`,
      '',
      ...p.items.map((f) => `- ${f.student}, ${f.sheetTitle}: ${f.message}\n  ${f.link}`),
      '',
      `Review queue: ${p.queueLink}`,
      '',
      SIGNATURE_TEXT,
    ].join('\n'),
    htmlBody: `<p>Hello ${escapeHtml(p.name)},</p><p>New flags in <strong>${escapeHtml(p.courseCode)}</strong> since the last summary:</p><ul>${p.items
      .map(
        (f) =>
          `<li><a href="${escapeHtml(f.link)}">${escapeHtml(f.student)}, ${escapeHtml(f.sheetTitle)}</a>: ${escapeHtml(f.message)}</li>`,
      )
      .join('')}</ul><p><a href="${escapeHtml(p.queueLink)}">Open the review queue</a></p>${SIGNATURE_HTML}`,
  }
}
