/**
 * The permission matrix: every page and API route asks `can(role, action)` and nothing else decides who may do
 * what. Roles are per team (a person may lead one team and review for another). Pure and dependency-free, so the
 * matrix is unit-tested exhaustively.
 */
export const roles = ['admin', 'lead', 'analyst', 'reviewer'] as const;
export type Role = (typeof roles)[number];

export const actions = [
  'team:view',
  'study:view',
  'study:create',
  'study:edit',
  'member:view',
  'member:invite',
  'member:manage',
  'analysisSession:create',
  'analysisSession:editOwn',
  'analysisSession:submit',
  'analysisSession:signOff',
  'analysisSession:return',
  'note:create',
  'audit:view',
  'site:administer',
] as const;
export type Action = (typeof actions)[number];

const matrix: Record<Role, ReadonlySet<Action>> = {
  // Site administration: people, memberships, studies; does not analyse or sign off.
  admin: new Set<Action>([
    'team:view', 'study:view', 'study:create', 'study:edit', 'member:view', 'member:invite', 'member:manage',
    'audit:view', 'site:administer',
  ]),
  // Manages the team and its studies, invites, reviews and signs off.
  lead: new Set<Action>([
    'team:view', 'study:view', 'study:create', 'study:edit', 'member:view', 'member:invite',
    'analysisSession:signOff', 'analysisSession:return', 'note:create', 'audit:view',
  ]),
  // Creates and edits own analysis sessions and submits them for review.
  analyst: new Set<Action>([
    'team:view', 'study:view', 'member:view', 'analysisSession:create', 'analysisSession:editOwn',
    'analysisSession:submit', 'note:create',
  ]),
  // Reads and leaves notes.
  reviewer: new Set<Action>(['team:view', 'study:view', 'member:view', 'note:create']),
};

export function isRole(value: unknown): value is Role {
  return typeof value === 'string' && (roles as readonly string[]).includes(value);
}

/** true when `role` may perform `action`; a missing role (not a member) may do nothing. */
export function can(role: Role | null | undefined, action: Action): boolean {
  return role != null && matrix[role].has(action);
}

/** Roles a member of `role` may hand out in an invitation. */
export function invitableRoles(role: Role | null | undefined): Role[] {
  if (role === 'admin') return [...roles];
  if (role === 'lead') return ['lead', 'analyst', 'reviewer'];
  return [];
}
