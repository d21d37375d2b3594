/**
 * react-query hooks over the review API, for the session page and, later, the workspace (notes on the maps,
 * reopening a session). Reads are cached per session and refreshed in the background; notes go through the outbox
 * (src/lib/client/review/outbox.ts) so an unreachable server never loses one; status changes and signing are
 * plain mutations whose refusals come back in plain words (`plainRefusal`).
 */
import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import { useEffect, useMemo, useSyncExternalStore } from 'react';
import { send } from '../outbound';
import { plainRefusal, type ReviewStep } from './actions';
import { reviewOutbox, type OutboxItem } from './outbox';
import type { NoteAnchor, NoteView, SessionView, SignatureView } from './types';

export class ReviewRefusal extends Error {
  constructor(
    readonly status: number,
    readonly code: string | undefined,
    message: string,
  ) {
    super(message);
    this.name = 'ReviewRefusal';
  }
}

async function readJson<T>(response: Response): Promise<T> {
  let body: unknown = null;
  try {
    body = await response.json();
  } catch {
    // not JSON
  }
  if (!response.ok) {
    const error = (body as { error?: { code?: string; message?: string } } | null)?.error;
    throw new ReviewRefusal(response.status, error?.code, plainRefusal(response.status, error?.code, error?.message));
  }
  return body as T;
}

export const reviewKeys = {
  session: (id: string) => ['review', 'session', id] as const,
  summary: (id: string, version: number | null) => ['review', 'summary', id, version] as const,
  notes: (id: string) => ['review', 'notes', id] as const,
};

export function useSessionView(sessionId: string, initial?: SessionView) {
  return useQuery({
    queryKey: reviewKeys.session(sessionId),
    queryFn: async () => readJson<SessionView>(await send(`/api/analysis-sessions/${sessionId}`)),
    initialData: initial,
  });
}

export interface SummaryView {
  recipeVersion: number;
  summary: import('../../analysis/summary').Summary;
  summaryHash: string;
  uploadedAt: string;
}

/** The summary of a version, or null when none was uploaded. */
export function useSummary(sessionId: string, version: number | null) {
  return useQuery({
    queryKey: reviewKeys.summary(sessionId, version),
    enabled: version !== null,
    queryFn: async () => {
      const response = await send(`/api/analysis-sessions/${sessionId}/recipe-versions/${version}/summary`);
      if (response.status === 404) return null;
      return readJson<SummaryView>(response);
    },
    staleTime: Infinity, // a version's summary never changes
  });
}

export function useNotes(sessionId: string) {
  return useQuery({
    queryKey: reviewKeys.notes(sessionId),
    queryFn: async () => (await readJson<{ notes: NoteView[] }>(await send(`/api/analysis-sessions/${sessionId}/notes`))).notes,
  });
}

/** The account's outbox items for one session, live. */
export function useOutbox(userId: string, sessionId: string): OutboxItem[] {
  const box = reviewOutbox(userId);
  const queryClient = useQueryClient();
  useEffect(
    () =>
      box.onDelivered(({ item }) => {
        if (item.sessionId === sessionId) {
          void queryClient.invalidateQueries({ queryKey: reviewKeys.notes(sessionId) });
          if (item.kind === 'recipe-draft') void queryClient.invalidateQueries({ queryKey: reviewKeys.session(sessionId) });
        }
      }),
    [box, queryClient, sessionId],
  );
  const snapshot = useSyncExternalStore(
    (l) => box.subscribe(l),
    () => box.list(),
    () => box.list(),
  );
  return useMemo(() => snapshot.filter((i) => i.sessionId === sessionId), [snapshot, sessionId]);
}

export interface NewNote {
  body: string;
  recipeVersion: number | null;
  anchor?: NoteAnchor | null;
  mentions?: string[];
}

/** Posts a note through the outbox: kept in IndexedDB first, sent now or when the server answers again. */
export function postNote(userId: string, sessionId: string, note: NewNote): Promise<OutboxItem> {
  return reviewOutbox(userId).enqueue('note', sessionId, `/api/analysis-sessions/${sessionId}/notes`, {
    body: note.body,
    recipeVersion: note.recipeVersion,
    anchor: note.anchor ?? null,
    mentions: note.mentions ?? [],
  });
}

export function postReply(userId: string, sessionId: string, noteId: string, body: string): Promise<OutboxItem> {
  return reviewOutbox(userId).enqueue('reply', sessionId, `/api/notes/${noteId}/replies`, { body, mentions: [] });
}

/** Queues a recipe draft as the next version (`baseVersion`: the version it was edited from). */
export function queueRecipeDraft(userId: string, sessionId: string, baseVersion: number | null, recipe: Record<string, unknown>): Promise<OutboxItem> {
  return reviewOutbox(userId).enqueue('recipe-draft', sessionId, `/api/analysis-sessions/${sessionId}/recipe-versions`, { baseVersion, recipe });
}

export function useResolveNote(sessionId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: async ({ noteId, resolved }: { noteId: string; resolved: boolean }) =>
      readJson(await send(`/api/notes/${noteId}/resolution`, { method: 'PUT', json: { resolved } })),
    // optimistic: the note shows resolved at once and goes back if the server refuses
    onMutate: async ({ noteId, resolved }) => {
      await queryClient.cancelQueries({ queryKey: reviewKeys.notes(sessionId) });
      const before = queryClient.getQueryData<NoteView[]>(reviewKeys.notes(sessionId));
      queryClient.setQueryData<NoteView[]>(reviewKeys.notes(sessionId), (notes) => notes?.map((n) => (n.id === noteId ? { ...n, resolvedAt: resolved ? new Date().toISOString() : null } : n)));
      return { before };
    },
    onError: (_e, _v, context) => queryClient.setQueryData(reviewKeys.notes(sessionId), context?.before),
    onSettled: () => queryClient.invalidateQueries({ queryKey: reviewKeys.notes(sessionId) }),
  });
}

export interface StepInput {
  step: ReviewStep;
  recipeVersion: number;
  password?: string;
  reason?: string;
}

/** Ask for review, return, sign off, or sign as reviewed. */
export function useReviewStep(sessionId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: async ({ step, recipeVersion, password, reason }: StepInput) => {
      if (step === 'reviewed') {
        return readJson<{ signature: SignatureView }>(
          await send(`/api/analysis-sessions/${sessionId}/signatures`, { json: { meaning: 'reviewed', recipeVersion, password }, logBodyAs: JSON.stringify({ meaning: 'reviewed', recipeVersion, password: '(not shown)' }) }),
        );
      }
      const body = step === 'submit' ? { change: 'submit', recipeVersion } : step === 'return' ? { change: 'return', recipeVersion, password, reason } : { change: 'signOff', recipeVersion, password };
      return readJson(await send(`/api/analysis-sessions/${sessionId}/status`, { json: body, logBodyAs: JSON.stringify({ ...body, ...(password !== undefined ? { password: '(not shown)' } : {}) }) }));
    },
    onSettled: () => queryClient.invalidateQueries({ queryKey: reviewKeys.session(sessionId) }),
  });
}
