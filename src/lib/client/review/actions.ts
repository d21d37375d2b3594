/**
 * Which review steps a person may take on a session now: the permission matrix (src/lib/permissions.ts), the
 * owner rules the routes add (only the owner submits; nobody signs their own session) and the order of statuses
 * (draft or returned → in review → returned | signed off). Pure, so a screen never offers what the server refuses.
 */
import { can, type Role } from '../../permissions';
import type { SessionStatus } from './types';

export type ReviewStep = 'submit' | 'return' | 'signOff' | 'reviewed';

export interface StepCheck {
  role: Role;
  isOwner: boolean;
  status: SessionStatus;
  currentVersion: number | null;
  hasSummary: boolean;
}

/** The steps to offer, in the order a screen shows them. */
export function allowedSteps({ role, isOwner, status, currentVersion }: StepCheck): ReviewStep[] {
  if (currentVersion === null) return [];
  const steps: ReviewStep[] = [];
  if (isOwner && can(role, 'analysisSession:submit') && (status === 'draft' || status === 'returned')) steps.push('submit');
  if (!isOwner && status === 'in review') {
    if (can(role, 'analysisSession:signOff')) steps.push('signOff');
    if (can(role, 'analysisSession:return')) steps.push('return');
    if (can(role, 'analysisSession:sign')) steps.push('reviewed');
  }
  return steps;
}

/** Why nothing is offered, in plain words (shown instead of buttons). */
export function whyNoSteps({ role, isOwner, status, currentVersion }: StepCheck): string {
  if (currentVersion === null) return 'Nothing to review yet: no recipe version has been saved.';
  if (status === 'signed off') return 'Signed off. Saving a new recipe version would start a new draft; the signature stays with the version it covers.';
  if (status === 'in review') {
    if (isOwner) return 'Waiting for a lead of the team to review it. Nobody signs their own session.';
    return 'A lead of the team reviews and signs; you can read it and leave notes.';
  }
  if (isOwner) return role === 'analyst' ? '' : 'Only an analyst who owns a session asks for its review.';
  return 'The analyst who owns this session asks for review when it is ready; you can leave notes meanwhile.';
}

export const STEP_WORDS: Record<ReviewStep, string> = {
  submit: 'Ask for review',
  signOff: 'Sign off',
  return: 'Return with a reason',
  reviewed: 'Sign as reviewed',
};

export const MEANING_WORDS = { reviewed: 'reviewed (read through)', approved: 'approved (signed off)', returned: 'returned for changes' } as const;

/**
 * A refusal in plain words: never a permission code. `code` and `message` are the API's error body; `status` its
 * HTTP status.
 */
export function plainRefusal(status: number, code: string | undefined, message: string | undefined): string {
  switch (code) {
    case 'wrong_password':
      return 'That is not your password. Nothing was signed.';
    case 'own_session':
      return 'Nobody signs their own session: another lead of the team has to. Nothing was signed.';
    case 'stale_version':
      return 'Someone saved a newer recipe version while you were reading. Reload to see it; nothing was changed.';
    case 'out_of_order':
      return 'The session’s status changed while you were reading. Reload to see where it stands; nothing was changed.';
    case 'stale_note':
      return 'This note was changed by its author meanwhile. Reload to see the new text; yours was not saved.';
    case 'unauthenticated':
      return 'Your sign-in has ended. Sign in again; nothing was changed.';
    case 'not_found':
      return 'This session is no longer there, or you are no longer in its team.';
    default:
      break;
  }
  if (status === 403) return 'Your role in this team does not allow this. Nothing was changed.';
  if (status === 429) return message ?? 'Too many tries. Wait a while and try again.';
  // The server's own sentences for bad input name the field; strip any permission code in parentheses.
  return (message ?? `The server answered ${status}.`).replace(/\s*\([a-zA-Z]+:[a-zA-Z]+\)/g, '');
}
