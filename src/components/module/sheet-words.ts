import type { ModuleStatus, VersionStatus } from '@shared/schemas/modules'

/**
 * The life of a lab sheet in the words people see. A sheet is prepared by the instructor, issued to
 * the class (students read it, and get an e-mail), and may be withdrawn again (students no longer
 * see it; its hand-ins stay). The stored states keep their short names.
 */
export function sheetStateWords(status: ModuleStatus, everIssued: boolean): string {
  if (status === 'published') return 'Issued to the class'
  if (status === 'closed') return 'Closed'
  return everIssued ? 'Withdrawn' : 'Being prepared'
}

/** A version's state in the editor and its history. */
export const VERSION_STATE_WORDS: Record<VersionStatus, string> = {
  draft: 'being prepared',
  published: 'issued',
  superseded: 'replaced by a later issue',
}
