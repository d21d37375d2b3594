/**
 * What the review API answers (src/pages/api/analysis-sessions/**, src/pages/api/notes/**), as the browser sees it.
 * Note anchors are the server's `NoteAnchor` (src/lib/schemas/review.ts): the workspace's map pins will build them.
 */
import type { NoteAnchorT } from '../../schemas/review';

export type NoteAnchor = NoteAnchorT;
export type SessionStatus = 'draft' | 'in review' | 'returned' | 'signed off';
export type Meaning = 'reviewed' | 'approved' | 'returned';

export interface SignatureView {
  id: string;
  recipeVersion: number;
  signerId: string;
  printedName: string;
  meaning: Meaning;
  reason: string | null;
  contentHash: string;
  signedAt: string;
}

export interface SessionView {
  analysisSession: {
    id: string;
    studyId: string;
    subjectId: string;
    subjectCode: string;
    fingerprint: string | null;
    ownerId: string;
    status: SessionStatus;
    returnReason: string | null;
    currentVersion: number | null;
    createdAt: string;
    updatedAt: string;
  };
  current: { number: number; recipe: Record<string, unknown>; recipeHash: string; createdBy: string; createdAt: string; summaryHash: string | null } | null;
  versions: { number: number; recipeHash: string; createdAt: string; createdBy: string; summaryHash: string | null }[];
  signatures: SignatureView[];
}

export interface NoteView {
  id: string;
  parentId: string | null;
  recipeVersion: number | null;
  anchor: NoteAnchor | null;
  authorId: string;
  authorName?: string;
  body: string;
  mentions: string[];
  revision: number;
  resolvedAt: string | null;
  resolvedBy: string | null;
  createdAt: string;
  updatedAt: string;
}
