/** What every template returns; the service adds the recipient and the dedupe key. */
export interface MailText {
  subject: string
  textBody: string
  htmlBody: string
}

/** Escapes text for the HTML bodies composed here. */
export function escapeHtml(s: string): string {
  return s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!)
}

export const SIGNATURE_TEXT = '— Isentrope'
export const SIGNATURE_HTML = '<p style="color:#5d574c">— Isentrope</p>'

/** A course as mails name it. */
export interface MailCourse {
  code: string
  title: string
}
