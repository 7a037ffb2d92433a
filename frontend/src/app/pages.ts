import type { Role } from '@kinpath/contracts';

/** A page that only some roles may open; the navigation and the route guards both read this. */
export interface RolePage {
  path: string;
  navLabel: string;
  roles: readonly Role[];
  /** Marked as the current page only on its own path, not on the pages under it. */
  end?: boolean;
}

export const PAGES = {
  // Registrar staff may look students up too (api.md); shortlists, notes and summaries stay advisors'.
  advising: { path: '/advising', navLabel: 'Student lookup', roles: ['advisor', 'registrar'] },
  registrar: {
    path: '/registrar',
    navLabel: 'Registrar overview',
    roles: ['registrar'],
    end: true,
  },
  imports: { path: '/registrar/imports', navLabel: 'Imports', roles: ['registrar'] },
  catalogue: {
    path: '/registrar/catalogue',
    navLabel: 'Catalogue and terms',
    roles: ['registrar'],
  },
  gradeScale: { path: '/registrar/grade-scale', navLabel: 'Grade scale', roles: ['registrar'] },
  modelSettings: { path: '/registrar/model', navLabel: 'Model settings', roles: ['registrar'] },
  backtests: { path: '/registrar/backtests', navLabel: 'Backtests', roles: ['registrar'] },
  outlook: {
    path: '/outlook',
    navLabel: 'Demand outlook',
    // Registrar staff read every department's outlook; a head reads their own (api.md).
    roles: ['department_head', 'registrar'],
  },
  users: { path: '/admin/users', navLabel: 'Users', roles: ['admin'] },
  audit: { path: '/audit', navLabel: 'Audit trail', roles: ['admin', 'registrar'] },
  scriptTokens: {
    path: '/script-tokens',
    navLabel: 'Script tokens',
    roles: ['admin', 'registrar'],
  },
} as const satisfies Record<string, RolePage>;

export type PageKey = keyof typeof PAGES;

/** Navigation order per role: the landing page first. */
const NAVIGATION: Record<Role, readonly PageKey[]> = {
  advisor: ['advising'],
  registrar: [
    'registrar',
    'imports',
    'catalogue',
    'gradeScale',
    'modelSettings',
    'backtests',
    'outlook',
    'audit',
    'advising',
    'scriptTokens',
  ],
  department_head: ['outlook'],
  admin: ['users', 'audit', 'scriptTokens'],
};

export function navigationFor(role: Role): RolePage[] {
  return NAVIGATION[role].map((key) => PAGES[key]);
}

export function landingPathFor(role: Role): string {
  return PAGES[NAVIGATION[role][0]].path;
}
