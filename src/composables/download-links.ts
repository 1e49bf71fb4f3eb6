/**
 * Addresses of the files a page offers as plain download links (`<a href download>`: the session
 * cookie goes along, a GET needs no CSRF header, nothing fetches). Pages take them from here, not
 * from `src/api`.
 */
export { feedbackReportUrl, moduleReportsZipUrl } from '@/api/reports'
export { submissionFileUrl, submissionImageUrl } from '@/api/submissions'
export { courseArchiveUrl } from '@/api/course-closing'
