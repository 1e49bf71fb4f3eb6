/**
 * Every e-mail text Isentrope sends, in one place: each template takes plain values and returns the
 * subject and the text and HTML bodies; the services decide who gets it and queue it in the outbox
 * (server/repositories/outbox.ts), and nodemailer sends it (server/mail/transport.ts).
 */
export { flagDigestMail } from './flag-digest'
export { handInReceivedMail } from './hand-in-received'
export type { MailText } from './layout'
export { invitationLink, pageLinks } from './links'
export { marksFinalMail } from './marks-final'
export { recheckAnsweredMail } from './recheck-answered'
export { rosterAddedMail, rosterInvitationMail } from './roster-invitation'
export { sheetIssuedMail } from './sheet-issued'
export { standReminderMail } from './stand-reminder'
export { bookingChangedMail, waitlistBookedMail } from './stand-booking'
