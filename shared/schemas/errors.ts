/** The JSON body of every error response from the API. */
export interface ApiErrorBody {
  error: {
    code: string
    message: string
    details?: unknown
  }
}

/** One field problem in a `validation_failed` error's details. */
export interface FieldIssue {
  path: string
  message: string
}
