import type { Role } from '@kinpath/contracts';

/** Public by design: listed in the README with a line saying to change them. */
export const DEMO_PASSWORD = 'kinpath-demo-2026';

export const DEMO_ACCOUNTS: ReadonlyArray<{
  email: string;
  displayName: string;
  role: Role;
  department: string | null;
}> = [
  { email: 'admin@halden.example', displayName: 'Halden admin', role: 'admin', department: null },
  {
    email: 'registrar@halden.example',
    displayName: 'Halden registrar',
    role: 'registrar',
    department: null,
  },
  {
    email: 'advisor@halden.example',
    displayName: 'Halden advisor',
    role: 'advisor',
    department: null,
  },
  {
    email: 'head.cmp@halden.example',
    displayName: 'Head of Computing',
    role: 'department_head',
    department: 'CMP',
  },
];
