/**
 * Team roles and what each may do: the one authorisation table, shared by the database schema,
 * the server's access checks, input validation and the islands (which only hide what a role
 * cannot do; the server decides).
 */
export const ROLES = ['owner', 'editor', 'reviewer', 'viewer'] as const;
export type Role = (typeof ROLES)[number];

export const PERMISSIONS = [
  'sheet.read',
  'sheet.write',
  'sheet.comment',
  'sheet.review',
  'log.upload',
  'team.manage',
] as const;
export type Permission = (typeof PERMISSIONS)[number];

/** What each role may do in its team; the owner may do everything. */
const GRANTS: Record<Role, readonly Permission[]> = {
  owner: PERMISSIONS,
  editor: ['sheet.read', 'sheet.write', 'sheet.comment'],
  reviewer: ['sheet.read', 'sheet.comment', 'sheet.review', 'log.upload'],
  viewer: ['sheet.read'],
};

/** True when `role` grants `permission`. */
export function can(role: Role, permission: Permission): boolean {
  return GRANTS[role].includes(permission);
}

/** True when every permission of `role` is also granted to `holder` (used to cap token roles). */
export function roleWithin(role: Role, holder: Role): boolean {
  return GRANTS[role].every((permission) => can(holder, permission));
}
