/** The actions the audit trail records. Names are stable: filters and exports rely on them. */
export const AUDIT_ACTIONS = {
  signIn: 'auth.sign_in',
  signInFailed: 'auth.sign_in_failed',
  userCreated: 'user.created',
  userUpdated: 'user.updated',
  demoLoaded: 'demo.loaded',
  firstAdminCreated: 'user.first_admin_created',
} as const;
export type AuditAction = (typeof AUDIT_ACTIONS)[keyof typeof AUDIT_ACTIONS];
