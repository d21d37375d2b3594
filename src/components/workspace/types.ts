import type { Role } from '../../lib/permissions';

export interface WorkspaceProps {
  study: { id: string; name: string };
  team: { id: string; name: string };
  role: Role;
  mayCreateSessions: boolean;
}

/** The screens of the analysis workspace, in the order a person works through them (names: GLOSSARY.md). */
export const screens = ['Source', 'Recipe', 'Maps', 'Spectrum', 'Bands', 'Outbound'] as const;
export type ScreenName = (typeof screens)[number];
