/**
 * Review e-mail (issue 11): review requested (to the team's leads), returned or signed off (to the session's owner),
 * mentioned in a note (to each person mentioned). Plain text and an HTML alternative, each with a link to the exact
 * place on the study page (`#session-<id>`, `#note-<id>`). Each person can mute each kind (/account/notifications).
 * Each message is queued in the outbox inside the transaction of the change that causes it (src/lib/server/mail.ts):
 * recipients and mutes are read in that transaction, and the outbox sender delivers after the commit. A relay that
 * cannot be reached delays the mail; it never undoes or fails the change.
 */
import type { Tx } from '../../db/client';
import { mailRecipients, teamLeadIds } from '../../db/queries/review';
import type { MailKind } from '../schemas/review';
import { publicOrigin, queueMail } from './mail';

export function escapeHtml(text: string): string {
  return text.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c]!);
}

export function studyLink(url: URL, teamId: string, studyId: string, anchor: string): string {
  return `${publicOrigin(url)}/teams/${teamId}/studies/${studyId}#${anchor}`;
}

interface Letter {
  subject: string;
  lines: string[];
  link: string;
  linkWords: string;
}

async function deliver(tx: Tx, kind: MailKind, userIds: string[], letter: Letter, exceptUserId: string): Promise<void> {
  const people = await mailRecipients(tx, userIds.filter((id) => id !== exceptUserId), kind);
  const footer = 'You get this because of your role in a Tidemark team. Mute this kind of message on your account\'s notifications page. Tidemark is a research tool, not a medical device.';
  for (const person of people) {
    const text = [`Hello ${person.displayName},`, '', ...letter.lines, '', `${letter.linkWords}: ${letter.link}`, '', footer].join('\n');
    const html = [
      `<p>Hello ${escapeHtml(person.displayName)},</p>`,
      ...letter.lines.map((l) => `<p>${escapeHtml(l)}</p>`),
      `<p><a href="${escapeHtml(letter.link)}">${escapeHtml(letter.linkWords)}</a></p>`,
      `<p style="color:#566">${escapeHtml(footer)}</p>`,
    ].join('\n');
    await queueMail(tx, { kind, to: person.email, recipientId: person.id, subject: letter.subject, text, html });
  }
}

export interface ReviewPlace {
  url: URL;
  team: { id: string; name: string };
  study: { id: string; name: string };
  session: { id: string; subjectCode: string; ownerId: string };
}

export async function mailReviewRequested(tx: Tx, p: ReviewPlace, actor: { id: string; displayName: string }, recipeVersion: number) {
  await deliver(tx, 'review-requested', await teamLeadIds(tx, p.team.id), {
    subject: `Review requested: ${p.session.subjectCode} in ${p.study.name}`,
    lines: [`${actor.displayName} asks for a review of subject ${p.session.subjectCode}, recipe version ${recipeVersion}, in the study "${p.study.name}" (${p.team.name}).`],
    link: studyLink(p.url, p.team.id, p.study.id, `session-${p.session.id}`),
    linkWords: 'Open the session',
  }, actor.id);
}

export async function mailReviewOutcome(tx: Tx, p: ReviewPlace, actor: { id: string; displayName: string }, outcome: 'returned' | 'signed off', recipeVersion: number, reason: string | null) {
  await deliver(tx, 'review-outcome', [p.session.ownerId], {
    subject: outcome === 'returned' ? `Returned: ${p.session.subjectCode} in ${p.study.name}` : `Signed off: ${p.session.subjectCode} in ${p.study.name}`,
    lines: [
      `${actor.displayName} ${outcome === 'returned' ? 'returned' : 'signed off'} subject ${p.session.subjectCode}, recipe version ${recipeVersion}, in the study "${p.study.name}".`,
      ...(reason ? [`Reason: ${reason}`] : []),
    ],
    link: studyLink(p.url, p.team.id, p.study.id, `session-${p.session.id}`),
    linkWords: 'Open the session',
  }, actor.id);
}

export async function mailMentioned(tx: Tx, p: ReviewPlace, actor: { id: string; displayName: string }, noteId: string, body: string, mentioned: string[]) {
  const excerpt = body.length > 300 ? `${body.slice(0, 300)}…` : body;
  if (mentioned.length === 0) return;
  await deliver(tx, 'note-mention', mentioned, {
    subject: `${actor.displayName} mentioned you: ${p.session.subjectCode} in ${p.study.name}`,
    lines: [`${actor.displayName} mentioned you in a note on subject ${p.session.subjectCode} in the study "${p.study.name}":`, `“${excerpt}”`],
    link: studyLink(p.url, p.team.id, p.study.id, `note-${noteId}`),
    linkWords: 'Open the note',
  }, actor.id);
}
