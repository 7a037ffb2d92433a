import type { AuditAction } from '../audit/audit-actions';

/**
 * Audit actions of the advisor's workspace. The target is always the student's
 * ref; detail never holds a student number, a pseudonym, note text or an address.
 */
export const STUDENT_AUDIT = {
  lookup: 'student.lookup',
  lookupNotFound: 'student.lookup_not_found',
  /** One user looked up many numbers that match no student: perhaps guessing. */
  lookupMissesAlert: 'student.lookup_misses_alert',
  electivesViewed: 'student.electives_viewed',
  noteAdded: 'student.note_added',
  noteEdited: 'student.note_edited',
  noteDeleted: 'student.note_deleted',
  shortlistChanged: 'student.shortlist_changed',
  summarySent: 'student.summary_sent',
} as const;

export const auditAction = (action: (typeof STUDENT_AUDIT)[keyof typeof STUDENT_AUDIT]) =>
  action as unknown as AuditAction;
