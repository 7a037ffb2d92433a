import type { Role } from '@kinpath/contracts';

/** A page that only some roles may open; the navigation and the route guards both read this. */
export interface RolePage {
  path: string;
  navLabel: string;
  roles: readonly Role[];
}

export const PAGES = {
  advising: { path: '/advising', navLabel: 'Student lookup', roles: ['advisor'] },
  registrar: { path: '/registrar', navLabel: 'Imports and term data', roles: ['registrar'] },
  outlook: {
    path: '/outlook',
    navLabel: 'Demand outlook',
    // Registrar staff read every department's outlook; a head reads their own (api.md).
    roles: ['department_head', 'registrar'],
  },
  users: { path: '/admin/users', navLabel: 'Users', roles: ['admin'] },
} as const satisfies Record<string, RolePage>;

export type PageKey = keyof typeof PAGES;

/** Navigation order per role: the landing page first. */
const NAVIGATION: Record<Role, readonly PageKey[]> = {
  advisor: ['advising'],
  registrar: ['registrar', 'outlook'],
  department_head: ['outlook'],
  admin: ['users'],
};

export function navigationFor(role: Role): RolePage[] {
  return NAVIGATION[role].map((key) => PAGES[key]);
}

export function landingPathFor(role: Role): string {
  return PAGES[NAVIGATION[role][0]].path;
}
