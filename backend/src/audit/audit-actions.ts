/** The actions the audit trail records. Names are stable: filters and exports rely on them. */
export const AUDIT_ACTIONS = {
  signIn: 'auth.sign_in',
  signInFailed: 'auth.sign_in_failed',
  signInThrottled: 'auth.sign_in_throttled',
  signOut: 'auth.sign_out',
  passwordResetRequested: 'auth.password_reset_requested',
  passwordResetCompleted: 'auth.password_reset_completed',
  invitationSent: 'user.invitation_sent',
  invitationRevoked: 'user.invitation_revoked',
  invitationAccepted: 'user.invitation_accepted',
  auditExported: 'audit.exported',
  userCreated: 'user.created',
  userUpdated: 'user.updated',
  demoLoaded: 'demo.loaded',
  firstAdminCreated: 'user.first_admin_created',
  departmentAdded: 'department.added',
  departmentRemoved: 'department.removed',
  apiTokenCreated: 'api_token.created',
  apiTokenRevoked: 'api_token.revoked',
} as const;
export type AuditAction = (typeof AUDIT_ACTIONS)[keyof typeof AUDIT_ACTIONS];
