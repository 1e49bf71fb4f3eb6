/**
 * Where the feedback reports are downloaded from. Plain GET links (`<a href download>`): the
 * session cookie goes along and a GET needs no CSRF header, so nothing here fetches.
 */
const course = (courseId: number) => `/api/courses/${courseId}`

/** One hand-in's feedback report (PDF). */
export const feedbackReportUrl = (courseId: number, submissionId: number) =>
  `${course(courseId)}/submissions/${submissionId}/report.pdf`

/** Every lab group's or student's counted report of a module, one PDF each, in a zip (instructors). */
export const moduleReportsZipUrl = (courseId: number, moduleId: number) =>
  `${course(courseId)}/modules/${moduleId}/reports.zip`
