import type { Role } from './roles';
import type { UserRecord } from './auth';

/** An account as the admin's user list shows it. */
export interface UserAccount extends UserRecord {
  /** True while the account waits for its invitation to be accepted (no password yet). */
  pendingInvitation: boolean;
  updatedAt: string;
}

/** The answer to `POST /api/users`: the account, and a sentence when it is not ready yet. */
export interface CreateUserResponse extends UserAccount {
  notice: string | null;
}

export interface UpdateUserRequest {
  role?: Role;
  department?: string | null;
  displayName?: string;
  active?: boolean;
}
