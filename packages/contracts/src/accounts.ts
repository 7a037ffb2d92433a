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
  detail: Record<string, unknown>;
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
