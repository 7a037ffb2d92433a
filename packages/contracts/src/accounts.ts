/** Invitations, password resets and the audit trail (api.md: accounts and audit). */

export interface AcceptInvitationRequest {
  token: string;
  password: string;
}

export interface PasswordResetRequest {
  email: string;
}

export interface PasswordResetConfirmRequest {
  token: string;
  password: string;
}

/** The answer to accepting an invitation or setting a new password. */
/** `POST /api/auth/invitations/check` and `/password-reset/check`: the link is usable, for this account. */
export interface LinkCheckResponse {
  email: string;
}

export interface PasswordSetResponse {
  email: string;
  message: string;
}

/** One line of the audit trail as `GET /api/audit` lists it. */
export interface AuditEntry {
  id: string;
  at: string;
  actorId: string | null;
  actorEmail: string | null;
  action: string;
  target: string | null;
  /** What the target is in words: the account's e-mail, the import's file name, a code; null when none. */
  targetLabel: string | null;
  detail: Record<string, unknown>;
}

/** Each recorded action in words, for screens; the codes stay the stable names for filters and exports. */
export const AUDIT_ACTION_LABELS: Readonly<Record<string, string>> = {
  'auth.sign_in': 'Signed in',
  'auth.sign_in_failed': 'Sign-in failed',
  'auth.sign_in_throttled': 'Sign-in held back',
  'auth.sign_out': 'Signed out',
  'auth.password_reset_requested': 'Password reset asked for',
  'auth.password_reset_completed': 'Password reset',
  'user.invitation_sent': 'Invitation sent',
  'user.invitation_revoked': 'Invitation withdrawn',
  'user.invitation_accepted': 'Invitation accepted',
  'user.created': 'Account created',
  'user.updated': 'Account changed',
  'user.first_admin_created': 'First admin created',
  'audit.exported': 'Audit trail downloaded',
  'demo.loaded': 'Demo data loaded',
  'department.added': 'Department added',
  'department.removed': 'Department removed',
  'import.uploaded': 'Term data uploaded',
  'import.committed': 'Import committed',
  'import.rolled_back': 'Import rolled back',
  'import.discarded': 'Import discarded',
  'import.checked_again': 'Import checked again with another mapping',
  'api_token.created': 'Script token created',
  'api_token.revoked': 'Script token revoked',
  'grade_scale.updated': 'Grade scale saved',
  'model.settings_changed': 'Model settings changed',
  'model.settings_restored': 'Model settings restored',
  'model.evaluation_requested': 'Backtest started',
  'model.evaluation_finished': 'Backtest finished',
  'model.evaluation_failed': 'Backtest failed',
  'student.lookup': 'Student looked up',
  'student.lookup_not_found': 'Student not found',
  'student.lookup_misses_alert': 'Many unknown student numbers looked up',
  'student.electives_viewed': 'Electives viewed',
  'student.note_added': 'Note added',
  'student.note_edited': 'Note edited',
  'student.note_deleted': 'Note deleted',
  'student.shortlist_changed': 'Shortlist changed',
  'student.summary_sent': 'Summary sent',
};

/** The words for an action; an action added later without words shows its code. */
export function auditActionLabel(action: string): string {
  return AUDIT_ACTION_LABELS[action] ?? action;
}

export interface AuditPage {
  items: AuditEntry[];
  total: number;
  page: number;
  pageSize: number;
  /** Every action name the trail holds, for the filter. */
  actions: string[];
}

export const AUDIT_PAGE_SIZE_MAX = 200;
