/** Workspace roles, weakest first. A role may do everything the roles before it may. */
export const ROLES = ['viewer', 'maintainer', 'admin'] as const;
export type Role = (typeof ROLES)[number];

export function roleAtLeast(role: Role, needed: Role): boolean {
  return ROLES.indexOf(role) >= ROLES.indexOf(needed);
}

/** What each role is for, shown on the members page. */
export const ROLE_DESCRIPTIONS: Record<Role, string> = {
  viewer: 'Reads builds and runs, subscribes to digests, annotates runs.',
  maintainer: 'Also sets policies, accepts baselines, manages CI tokens, cases and projects.',
  admin: 'Also manages members and their roles.',
};
