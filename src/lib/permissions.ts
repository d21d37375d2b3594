/**
 * The permission matrix: every page and API route asks `can(role, action)` (team work) or `canSite(user, action)`
 * (site administration) and nothing else decides who may do what. Team roles are per team (a person may lead one
 * team and review for another). Site administration is not a team role: it is the `operator` flag on the account,
 * and an operator sees no team's studies unless also a member of that team. Pure and dependency-free, so the
 * matrix is unit-tested exhaustively.
 */
export const roles = ['lead', 'analyst', 'reviewer'] as const;
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
  'analysisSession:sign',
  'note:view',
  'note:create',
  'note:resolve',
  'summary:import',
  'audit:view',
  'cohort:covariates',
  'cohort:design',
  'cohort:includeUnsigned',
  'slopeReport:view',
  'slopeReport:save',
] as const;
export type Action = (typeof actions)[number];

const matrix: Record<Role, ReadonlySet<Action>> = {
  // Manages the team, its members and its studies, invites, reviews, returns and signs off (never their own session:
  // that rule needs the owner, so the review routes check it beside this matrix).
  lead: new Set<Action>([
    'team:view', 'study:view', 'study:create', 'study:edit', 'member:view', 'member:invite', 'member:manage',
    'analysisSession:signOff', 'analysisSession:return', 'analysisSession:sign', 'note:view', 'note:create', 'note:resolve',
    'summary:import', 'audit:view', 'cohort:covariates', 'cohort:design', 'cohort:includeUnsigned', 'slopeReport:view',
    'slopeReport:save',
  ]),
  // Creates and edits own analysis sessions and submits them for review.
  analyst: new Set<Action>([
    'team:view', 'study:view', 'member:view', 'analysisSession:create', 'analysisSession:editOwn',
    'analysisSession:submit', 'note:view', 'note:create', 'note:resolve', 'summary:import', 'cohort:covariates',
    'slopeReport:view', 'slopeReport:save',
  ]),
  // Reads sessions and leaves notes; signs nothing.
  reviewer: new Set<Action>(['team:view', 'study:view', 'member:view', 'note:view', 'note:create', 'note:resolve', 'slopeReport:view']),
};

/**
 * What each action is, in the words a refusal says ("Your role (reviewer) may not create analysis sessions."): a
 * person never reads an action's code.
 */
export const actionWords: Record<Action, string> = {
  'team:view': 'see this team',
  'study:view': 'see this study',
  'study:create': 'create studies',
  'study:edit': 'change this study',
  'member:view': 'see the team’s members',
  'member:invite': 'invite people to the team',
  'member:manage': 'change members’ roles',
  'analysisSession:create': 'create analysis sessions',
  'analysisSession:editOwn': 'change this analysis session',
  'analysisSession:submit': 'ask for review',
  'analysisSession:signOff': 'sign off analysis sessions',
  'analysisSession:return': 'return analysis sessions',
  'analysisSession:sign': 'sign analysis sessions',
  'note:view': 'read notes',
  'note:create': 'write notes',
  'note:resolve': 'resolve notes',
  'summary:import': 'bring in summaries',
  'audit:view': 'read the team’s audit trail',
  'cohort:covariates': 'change the subjects’ covariates',
  'cohort:design': 'change the study’s saved tests',
  'cohort:includeUnsigned': 'pool unsigned sessions',
  'slopeReport:view': 'read slope check reports',
  'slopeReport:save': 'save slope check reports',
};

/** The refusal a person reads when `role` may not take `action`: plain words, never the action's code. */
export function refusalWords(role: Role | null | undefined, action: Action): string {
  const who = role ? `Your role in this team (${role})` : 'Only members of this team';
  const roleThatMay = roles.filter((r) => can(r, action));
  const may = roleThatMay.length === 0 ? '' : ` ${roleThatMay.map((r) => `${r}s`).join(' and ').replace(/^./, (c) => c.toUpperCase())} may.`;
  return role ? `${who} may not ${actionWords[action]}.${may}` : `${who} may ${actionWords[action]}.`;
}

export function isRole(value: unknown): value is Role {
  return typeof value === 'string' && (roles as readonly string[]).includes(value);
}

/** true when `role` may perform `action`; a missing role (not a member) may do nothing. */
export function can(role: Role | null | undefined, action: Action): boolean {
  return role != null && matrix[role].has(action);
}

/** Roles a member of `role` may hand out in an invitation or a role change. Operator is never one of them. */
export function invitableRoles(role: Role | null | undefined): Role[] {
  if (role === 'lead') return [...roles];
  return [];
}

/** Site-level actions, granted by the operator flag alone (never by a team role). */
export const siteActions = ['site:users', 'site:teams', 'site:audit', 'site:operators'] as const;
export type SiteAction = (typeof siteActions)[number];

export function canSite(user: { isOperator: boolean } | null | undefined, _action: SiteAction): boolean {
  return user?.isOperator === true;
}
