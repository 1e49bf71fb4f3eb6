/**
 * The due date that applies to one student: their extension when it is later than the module's
 * due date, otherwise the module's (an extension never brings a due date forward). Null when the
 * module has no due date.
 * @example dueFor(new Date('2027-02-09T17:00Z'), new Date('2027-02-12T17:00Z')) // 2027-02-12T17:00Z
 */
export function dueFor(moduleDue: Date | null, extended: Date | null | undefined): Date | null {
  if (moduleDue === null) return null
  return extended && extended.getTime() > moduleDue.getTime() ? extended : moduleDue
}
