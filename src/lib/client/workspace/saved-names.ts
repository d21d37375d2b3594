// Names of the saved-workspace databases, shared by saved-workspaces.ts and the sign-out script
// (sign-out-forget.ts), which must find this account's database without loading the workspace.

/** The object store inside each workspace database (key: the recording's fingerprint). */
export const WORKSPACE_STORE = 'workspaces';

const PREFIX = 'tidemark-workspace:';

/** The database holding the saved workspaces of account `userId` (and only that account's). */
export function workspaceDatabaseName(userId: string): string {
  return `${PREFIX}${userId}`;
}
