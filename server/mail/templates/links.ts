/**
 * Addresses of the pages e-mails link to, in the same shapes as the client's router
 * (src/router/index.ts): a course under `/c/<course slug>`, its lab sheets by their own slug.
 */
export function pageLinks(appUrl: string, courseSlug: string) {
  const course = `${appUrl.replace(/\/$/, '')}/c/${encodeURIComponent(courseSlug)}`
  return {
    course,
    sheet: (sheetSlug: string) => `${course}/sheets/${encodeURIComponent(sheetSlug)}`,
    handInResult: (submissionId: number) => `${course}/hand-ins/${submissionId}`,
    review: (submissionId: number) => `${course}/review/${submissionId}`,
    reviewQueue: `${course}/review`,
    myMarks: `${course}/my-marks`,
  }
}

/** The page where an invited person chooses a password (outside any course). */
export const invitationLink = (appUrl: string, token: string) => `${appUrl.replace(/\/$/, '')}/invitations/${token}`
