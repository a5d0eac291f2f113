import type { Role } from '../roles';

/** The invented demo team seeded into an empty database. Demo only: never use these sign-ins elsewhere. */
export const DEMO_TEAM = { slug: 'fenwick-line4', name: 'Fenwick Assembly Lab · Line 4 cell' } as const;

export const DEMO_PASSWORD = 'slipless-demo';

export const DEMO_USERS: readonly { name: string; email: string; role: Role }[] = [
  { name: 'Priya Okafor', email: 'owner@fenwick.example', role: 'owner' },
  { name: 'Tomas Lindqvist', email: 'editor@fenwick.example', role: 'editor' },
  { name: 'Mei Arroyo', email: 'reviewer@fenwick.example', role: 'reviewer' },
  { name: 'Jonah Bakker', email: 'viewer@fenwick.example', role: 'viewer' },
];

export const DEMO_SHEETS_FOLDER = 'content/sheets';
