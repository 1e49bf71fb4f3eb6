/**
 * Every `code` the server puts in an error body. Services throw `AppError` with one of these, so a
 * misspelt code is a type error, and the pages compare against the same list.
 */
export const ERROR_CODES = [
  // Framework and middleware
  'not_found',
  'forbidden',
  'unauthenticated',
  'validation_failed',
  'malformed_json',
  'payload_too_large',
  'csrf_failed',
  'database_unavailable',
  'internal_error',
  // Sign-in and invitations
  'bad_credentials',
  'too_many_attempts',
  'invitation_not_found',
  'invitation_expired',
  'invitation_used',
  // Courses, roster, sections and lab groups
  'course_exists',
  'section_exists',
  'lab_group_exists',
  'section_not_empty',
  'lab_group_not_empty',
  'lab_group_has_hand_ins',
  'section_mismatch',
  'not_a_student',
  'not_placeable',
  'last_instructor',
  'cannot_remove_self',
  'extension_not_later',
  'no_due_date',
  'roster_changed',
  'roster_file_refused',
  'roster_rows_invalid',
  'roster_skip_invalid',
  'course_closed',
  'course_not_closed',
  'confirmation_mismatch',
  // Modules
  'module_invalid',
  'edit_conflict',
  'already_published',
  'not_published',
  'module_draft',
  'module_closed',
  'no_assignment',
  // Hand-ins and grading
  'bad_upload',
  'upload_too_large',
  'invalid_submission',
  'no_lab_group',
  'attempts_used',
  'past_due',
  'past_late_limit',
  'not_graded',
  'results_hidden',
  'not_released',
  // Review and re-checks
  'points_out_of_range',
  'recheck_open',
  'recheck_answered',
  'run_not_opened',
  'run_exists',
  'booking_not_active',
  'unknown_checklist_item',
  'run_signed_off',
  'hold_points_open',
  'not_at_run',
  'signed_run_required',
  'stand_exists',
  'slot_overlap',
  'slot_in_past',
  'slot_taken',
  'slot_cancelled',
  'booking_cut_off',
  'wrong_section',
  'sheet_not_on_stand',
  'stand_runs_used',
  'already_waiting',
  'slot_free',
  'photo_refused',
] as const
export type ErrorCode = (typeof ERROR_CODES)[number]

/** The JSON body of every error response from the API. */
export interface ApiErrorBody {
  error: {
    code: ErrorCode
    message: string
    details?: unknown
  }
}

/** One field problem in a `validation_failed` error's details. */
export interface FieldIssue {
  path: string
  message: string
}
