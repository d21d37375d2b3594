import type { Role } from '../../lib/permissions';

export interface WorkspaceProps {
  study: { id: string; name: string };
  team: { id: string; name: string };
  role: Role;
  mayCreateSessions: boolean;
  /** The demo build offers the generated demo cohort only where it matches the study (DEMO_STUDY_DATA in db/seed). */
  offersDemoCohort?: boolean;
  /** The signed-in account: its local library is its own (src/lib/client/library.ts). */
  userId: string;
  /** Days a recording stays in the local library after it was last opened (settings.libraryDays). */
  libraryDays: number;
}

/** The screens of the analysis workspace, in the order a person works through them (names: GLOSSARY.md). */
export const screens = ['Source', 'Recipe', 'Maps', 'Spectrum', 'Bands', 'Slope check', 'Outbound'] as const;
export type ScreenName = (typeof screens)[number];
