/** The four roles of api.md. One user has exactly one role. */
export const ROLES = ['admin', 'registrar', 'advisor', 'department_head'] as const;
export type Role = (typeof ROLES)[number];

export const ROLE_LABELS: Record<Role, string> = {
  admin: 'Administrator',
  registrar: 'Registrar staff',
  advisor: 'Advisor',
  department_head: 'Department head',
};

/** Department codes are short upper-case letter codes, e.g. `CMP` (data.md). */
export const DEPARTMENT_CODE_PATTERN = /^[A-Z]{2,6}$/;
