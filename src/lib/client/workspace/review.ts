/**
 * The workspace's half of team review (issue 11, items 4–6): which analysis session the open workspace belongs to,
 * its notes and the region being pinned, saving recipe versions with their summary, autosave while tuning, and
 * reopening a session against the local recording. Screens read `useReviewLink` through selectors and act only
 * through the functions here.
 *
 * What leaves the browser: the session's subject code and fingerprint, recipes (parameters), the summary built by
 * the core (derived numbers, src/lib/analysis/summary.ts) and notes (words and anchors). Every request goes through
 * `send()`, whose guard refuses the file name and the header's identification fields.
 */
import canonicalize from 'canonicalize';
import { create } from 'zustand';
import { RecipeSchema, type RecipeInput } from '../../analysis/recipe';
import type { RecordingKind } from '../intake';
import { libraryFor, type LibraryEntry } from '../library';
import { OutboundRefusedError, send } from '../outbound';
import { plainRefusal } from '../review/actions';
import { postNote, queueRecipeDraft } from '../review/api';
import { reviewOutbox } from '../review/outbox';
import type { NoteAnchor, NoteView, SessionView } from '../review/types';
import { summarizeRecording } from '../summary-run';
import { applyRecipe } from './apply-recipe';
import { openRecording } from './open-recording';
import { plannedRecipe, recordingIdOf, runDecomposition } from './results';
import { fingerprintOfOpenRecording, recipeOf, useWorkspace, type WorkspaceState } from './store';

export type LinkedSession = SessionView['analysisSession'];

/**
 * How the open recording stands to the linked session: `no-session`; `needs-file` (no recording open yet, or its
 * fingerprint could not be computed); `fingerprint` (open, its fingerprint still being computed: checked then);
 * `mismatch` (the open file is another recording: nothing of the session is applied); `applying` (the stored
 * recipe is being put in place and run); `ready`; `failed` (the stored recipe does not fit: `message` says where).
 */
export type MatchPhase = 'no-session' | 'needs-file' | 'fingerprint' | 'mismatch' | 'applying' | 'ready' | 'failed';

export interface ReviewLinkState {
  userId: string | null;
  session: LinkedSession | null;
  current: SessionView['current'];
  loading: boolean;
  /** Why the session or its notes could not be read, in plain words. */
  problem: string | null;
  match: { phase: MatchPhase; message: string | null; libraryEntry: { fingerprint: string; fileName: string } | null };
  notes: NoteView[];
  selectedNoteId: string | null;
  /** A region drawn on a map, waiting for the note's words. */
  pending: NoteAnchor | null;
  pinMode: boolean;
  /** `stale`: another version was saved meanwhile; the person keeps theirs (save again) or takes the current one. */
  saving: { state: 'idle' | 'saving' | 'saved' | 'failed'; message: string | null; stale?: boolean };
  autosave: { enabled: boolean; state: 'idle' | 'waiting' | 'queued' | 'saved' | 'held'; message: string | null };
}

const INITIAL: ReviewLinkState = {
  userId: null,
  session: null,
  current: null,
  loading: false,
  problem: null,
  match: { phase: 'no-session', message: null, libraryEntry: null },
  notes: [],
  selectedNoteId: null,
  pending: null,
  pinMode: false,
  saving: { state: 'idle', message: null },
  autosave: { enabled: true, state: 'idle', message: null },
};

export const useReviewLink = create<ReviewLinkState>(() => INITIAL);

/** Quiet time after the last recipe edit before an autosave queues a new version. */
export const AUTOSAVE_QUIET_MS = 4_000;

const short = (fp: string) => `${fp.slice(0, 12)}…`;
const set = (patch: Partial<ReviewLinkState>) => useReviewLink.setState(patch);
const get = () => useReviewLink.getState();

/** The recipe as the server stores it (the schema's output) in RFC 8785 canonical form, or null when it does not parse. */
export function canonicalRecipe(recipe: unknown): string | null {
  const parsed = RecipeSchema.safeParse(recipe);
  return parsed.success ? (canonicalize(parsed.data) ?? null) : null;
}

async function readAnswer<T>(response: Response): Promise<{ ok: true; body: T } | { ok: false; status: number; code: string | undefined; message: string; body: unknown }> {
  let body: unknown = null;
  try {
    body = await response.json();
  } catch {
    // not JSON (a proxy's error page)
  }
  if (response.ok) return { ok: true, body: body as T };
  const error = (body as { error?: { code?: string; message?: string } } | null)?.error;
  return { ok: false, status: response.status, code: error?.code, message: plainRefusal(response.status, error?.code, error?.message), body };
}

function failureWords(error: unknown): string {
  if (error instanceof OutboundRefusedError) return `${error.message} Nothing was sent.`;
  return `The server cannot be reached (${error instanceof Error ? error.message : String(error)}). Nothing was lost here; try again when it answers.`;
}

/** May the signed-in person change this session's recipe now (the owner, while it is not in review)? */
export function mayEditSession(s: Pick<ReviewLinkState, 'session' | 'userId'>): boolean {
  return s.session !== null && s.session.ownerId === s.userId && s.session.status !== 'in review';
}

let unsubscribeDelivered: (() => void) | null = null;
let unsubscribeStore: (() => void) | null = null;
let focusWatched = false;

/** Binds the review link to the signed-in account (its outbox) and starts watching the workspace store. */
export function bindReview(userId: string): void {
  if (get().userId === userId && unsubscribeStore !== null) return;
  unsubscribeDelivered?.();
  unsubscribeStore?.();
  set({ ...INITIAL, userId });
  unsubscribeDelivered = reviewOutbox(userId).onDelivered(({ item }) => {
    if (item.sessionId !== get().session?.id) return;
    if (item.kind === 'recipe-draft') void refreshSession().then(() => scheduleAutosave());
    else void refreshNotes();
  });
  // Someone else's notes and review steps arrive when the person comes back to the tab (as the session page's queries do).
  if (!focusWatched && typeof window !== 'undefined') {
    focusWatched = true;
    window.addEventListener('focus', () => {
      if (get().session === null) return;
      void refreshSession();
      void refreshNotes();
    });
  }
  unsubscribeStore = useWorkspace.subscribe((s, prev) => {
    // A large file's fingerprint arrives (or fails) after it is opened: the session is checked against it then.
    if (s.openCount !== prev.openCount || s.fingerprint !== prev.fingerprint || s.fingerprintWait?.state !== prev.fingerprintWait?.state) void matchRecording();
    else if (recipeInputsChanged(s, prev)) scheduleAutosave();
  });
}

/** Forgets the linked session (the workspace keeps its recording and settings). */
export function unlinkAnalysisSession(): void {
  cancelAutosave();
  set({ session: null, current: null, problem: null, notes: [], selectedNoteId: null, pending: null, pinMode: false, match: { phase: 'no-session', message: null, libraryEntry: null }, saving: { state: 'idle', message: null } });
}

/**
 * Makes `sessionId` the workspace's analysis session: reads it and its notes, then checks the open recording (or
 * asks for it, offering the copy in this browser's library when its fingerprint matches) and re-runs the stored recipe.
 */
export async function linkAnalysisSession(sessionId: string): Promise<void> {
  cancelAutosave();
  set({ loading: true, problem: null, session: null, current: null, notes: [], selectedNoteId: null, pending: null, saving: { state: 'idle', message: null } });
  try {
    const answer = await readAnswer<SessionView>(await send(`/api/analysis-sessions/${encodeURIComponent(sessionId)}`));
    if (!answer.ok) return set({ loading: false, problem: `The analysis session could not be opened: ${answer.message}` });
    set({ loading: false, session: answer.body.analysisSession, current: answer.body.current });
    if (answer.body.analysisSession.subjectCode) useWorkspace.getState().set({ subjectCode: answer.body.analysisSession.subjectCode });
  } catch (error) {
    return set({ loading: false, problem: failureWords(error) });
  }
  await Promise.all([refreshNotes(), matchRecording()]);
}

/** Reads the linked session again (status, current version and its recipe). */
export async function refreshSession(): Promise<void> {
  const id = get().session?.id;
  if (id === undefined) return;
  try {
    const answer = await readAnswer<SessionView>(await send(`/api/analysis-sessions/${encodeURIComponent(id)}`));
    if (answer.ok && get().session?.id === id) set({ session: answer.body.analysisSession, current: answer.body.current, problem: null });
    else if (!answer.ok) set({ problem: answer.message });
  } catch (error) {
    set({ problem: failureWords(error) });
  }
}

export async function refreshNotes(): Promise<void> {
  const id = get().session?.id;
  if (id === undefined) return;
  try {
    const answer = await readAnswer<{ notes: NoteView[] }>(await send(`/api/analysis-sessions/${encodeURIComponent(id)}/notes`));
    if (answer.ok && get().session?.id === id) set({ notes: answer.body.notes });
    else if (!answer.ok) set({ problem: `The notes could not be read: ${answer.message}` });
  } catch (error) {
    set({ problem: failureWords(error) });
  }
}

/** After a refused save over a newer version: puts the session's current version in place and runs it. */
export async function takeCurrentVersion(): Promise<void> {
  set({ saving: { state: 'idle', message: null } });
  await refreshSession();
  await matchRecording();
}

/** Where the last applied stored recipe left the workspace (canonical), so reapplying it is not taken for an edit. */
let appliedCanonical: string | null = null;

/**
 * Compares the open recording with the linked session's fingerprint. Same recording: the stored recipe (if any) is
 * put in place and run. Another recording: refused with both fingerprints shortened; nothing is applied.
 */
export async function matchRecording(): Promise<void> {
  const { session, current, userId } = get();
  if (session === null) return;
  const ws = useWorkspace.getState();
  if (ws.recording !== null && ws.fingerprint === null && ws.fingerprintWait?.state === 'computing') {
    return set({ match: { phase: 'fingerprint', libraryEntry: null, message: 'The open recording is checked against the session once its SHA-256 fingerprint is computed; nothing of the session is applied before.' } });
  }
  if (ws.recording === null || ws.fingerprint === null) {
    let libraryEntry: { fingerprint: string; fileName: string } | null = null;
    if (session.fingerprint !== null && userId !== null && typeof indexedDB !== 'undefined') {
      try {
        const entry = (await libraryFor(userId).list()).find((e) => e.fingerprint === session.fingerprint);
        if (entry) libraryEntry = { fingerprint: entry.fingerprint, fileName: entry.fileName };
      } catch {
        // no library in this browser: the person opens the file on the Source screen
      }
    }
    const what = session.fingerprint === null ? 'its recording' : `the recording with SHA-256 ${short(session.fingerprint)}`;
    return set({
      match: {
        phase: 'needs-file',
        libraryEntry,
        message: `${ws.recording !== null ? 'The open recording’s fingerprint could not be computed (the Source screen says why). ' : ''}Open ${what} for subject ${session.subjectCode} on the Source screen${libraryEntry ? ', or take the copy kept in this browser' : ''}. It is checked against the session before anything is applied.`,
      },
    });
  }
  if (session.fingerprint !== null && ws.fingerprint !== session.fingerprint) {
    return set({
      match: {
        phase: 'mismatch',
        libraryEntry: null,
        message: `This is not the session’s recording: the open file’s SHA-256 begins ${short(ws.fingerprint)}, the session’s begins ${short(session.fingerprint)}. Nothing of the session was applied and its notes are not drawn; open the recording the session was made on.`,
      },
    });
  }
  if (current === null) {
    appliedCanonical = canonicalRecipe(recipeOf(ws));
    return set({ match: { phase: 'ready', message: null, libraryEntry: null } });
  }
  set({ match: { phase: 'applying', message: `Re-running recipe version ${current.number} of the session…`, libraryEntry: null } });
  // After the opening's own turn (the history folds changes made in it into the opening and may then bring back
  // this browser's saved workspace): applied later, the stored recipe is one undoable step and nothing overrides it.
  await new Promise((resolve) => setTimeout(resolve, 0));
  if (get().session?.id !== session.id || useWorkspace.getState().fingerprint !== ws.fingerprint) return;
  const outcome = applyRecipe(current.recipe, ws.recording, ws.fingerprint, ws.local?.reading ?? null);
  if (!outcome.ok) {
    return set({ match: { phase: 'failed', libraryEntry: null, message: `Recipe version ${current.number} does not fit the open recording at ${outcome.field}: ${outcome.message}` } });
  }
  const after = useWorkspace.getState();
  appliedCanonical = canonicalRecipe(recipeOf(after));
  const done = await runDecomposition(after.recording!, recordingIdOf(after.recording!, after.fingerprint), recipeOf(after), after.channel);
  if (get().session?.id !== session.id) return;
  set({
    match: done === null
      ? { phase: 'failed', libraryEntry: null, message: `Recipe version ${current.number} could not be run: ${useWorkspace.getState().run.message ?? 'see the Recipe screen'}` }
      : { phase: 'ready', libraryEntry: null, message: `Recipe version ${current.number} re-run on this recording.${outcome.notices.length ? ` ${outcome.notices.join(' ')}` : ''}` },
  });
}

/** Opens the linked session's recording from this account's library (the copy kept when it was last opened). */
export async function openSessionRecordingFromLibrary(): Promise<void> {
  const { userId, match } = get();
  const wanted = match.libraryEntry;
  if (userId === null || wanted === null) return;
  const library = libraryFor(userId);
  const found = await library.file(wanted.fingerprint);
  if (found === null) return set({ match: { ...match, libraryEntry: null, message: 'That copy is no longer in this browser’s library: open the file on the Source screen.' } });
  const entry: LibraryEntry = found.entry;
  const kind: RecordingKind =
    entry.kind === 'csv' && entry.csv ? { kind: 'csv', sampleRateHz: entry.csv.sampleRateHz, delimiter: entry.csv.delimiter, events: null } : { kind: 'edf', ...(entry.edf ?? {}) };
  const eventsName = entry.csv?.eventsFileName ?? entry.edfEventsFileName ?? null;
  const events = found.events && eventsName ? { blob: found.events, name: eventsName } : null;
  set({ match: { ...match, message: 'Opening the copy kept in this browser…' } });
  const outcome = await openRecording({ blob: found.blob, fileName: entry.fileName, kind, from: 'this browser’s library', events, library }, () => undefined);
  // Opening bumps openCount, and the store watcher runs matchRecording; only a failure needs words here.
  if (!outcome.ok) set({ match: { ...get().match, message: `The copy could not be opened: ${outcome.error.message}` } });
}

/**
 * Starts an analysis session for the open recording and `subjectCode` in `studyId` and links it. A second session
 * for the same subject and recording is refused with the server's words; `existingId` lets the person continue it.
 */
export async function startAnalysisSession(studyId: string, subjectCode: string): Promise<{ ok: true } | { ok: false; message: string; existingId: string | null }> {
  // A large file's fingerprint may still be computed: the session is made for it once it is known.
  const fingerprint = await fingerprintOfOpenRecording();
  if (fingerprint === null && useWorkspace.getState().recording !== null) {
    return { ok: false, message: useWorkspace.getState().fingerprintWait?.state === 'failed' ? 'The open recording has no fingerprint (see the Source screen): open it again first.' : 'Another recording was opened meanwhile; nothing was sent.', existingId: null };
  }
  let response: Response;
  try {
    response = await send(`/api/studies/${encodeURIComponent(studyId)}/analysis-sessions`, { json: { subjectCode, fingerprint } });
  } catch (error) {
    return { ok: false, message: error instanceof OutboundRefusedError ? `${error.message} Change the subject code.` : failureWords(error), existingId: null };
  }
  const answer = await readAnswer<{ analysisSession: { id: string } }>(response);
  if (!answer.ok) {
    const existing = (answer.body as { existing?: { id?: string } } | null)?.existing?.id ?? null;
    const message = answer.status === 403 ? `${answer.message} Only analysts start analysis sessions.` : answer.message;
    return { ok: false, message, existingId: existing };
  }
  await linkAnalysisSession(answer.body.analysisSession.id);
  return { ok: true };
}

// ---- saving versions -------------------------------------------------------------------------------------------

function recordingFits(): boolean {
  const { session, match } = get();
  return session !== null && (match.phase === 'ready' || match.phase === 'failed') && (session.fingerprint === null || session.fingerprint === useWorkspace.getState().fingerprint);
}

async function waitForQueuedDrafts(): Promise<boolean> {
  const { userId, session } = get();
  if (userId === null || session === null) return true;
  const box = reviewOutbox(userId);
  if (box.list().some((i) => i.sessionId === session.id && i.kind === 'recipe-draft')) await box.flush();
  return !box.list().some((i) => i.sessionId === session.id && i.kind === 'recipe-draft' && i.state !== 'refused');
}

/**
 * "Save as version": makes the workspace's recipe the session's current version (unless the current one holds
 * exactly it) and uploads that version's summary, computed here by the core in workers. Refusals (a newer version
 * saved elsewhere, a session in review) are said in plain words and change nothing.
 */
export async function saveAsVersion(): Promise<void> {
  const { session, userId } = get();
  if (session === null || userId === null) return;
  if (!mayEditSession(get())) return set({ saving: { state: 'failed', message: session.status === 'in review' ? 'The session is in review: its recipe cannot change until a lead returns it.' : 'Only the analyst who owns this session saves its versions.' } });
  if (!recordingFits()) return set({ saving: { state: 'failed', message: 'Open the session’s own recording first: a version is saved with numbers computed on it.' } });
  cancelAutosave();
  set({ saving: { state: 'saving', message: 'Saving the recipe…' } });
  if (!(await waitForQueuedDrafts())) return set({ saving: { state: 'failed', message: 'An autosaved draft still waits to be sent; the server cannot be reached. Try again when it answers.' } });
  await refreshSession();
  const ws = useWorkspace.getState();
  const recipe: RecipeInput = recipeOf(ws);
  const ours = canonicalRecipe(recipe);
  if (ours === null) return set({ saving: { state: 'failed', message: 'The recipe is not complete yet (check the Recipe screen); nothing was saved.' } });
  let { current } = get();
  let notices: string[] = [];
  try {
    if (current === null || canonicalize(current.recipe) !== ours) {
      const answer = await readAnswer<{ version: NonNullable<SessionView['current']> }>(
        await send(`/api/analysis-sessions/${session.id}/recipe-versions`, { json: { baseVersion: current?.number ?? null, recipe } }),
      );
      if (!answer.ok) {
        if (answer.code === 'stale_version') await refreshSession();
        return set({ saving: { state: 'failed', message: answer.message, stale: answer.code === 'stale_version' } });
      }
      await refreshSession();
      current = get().current;
    }
    if (current === null) return set({ saving: { state: 'failed', message: 'The saved version could not be read back; reload the page.' } });
    appliedCanonical = ours;
    if (current.summaryHash === null) {
      set({ saving: { state: 'saving', message: `Computing the summary of version ${current.number} on this device…` } });
      // The recipe's one plan (made in the plan worker, shared with the run when it is the run's recipe).
      const planned = await plannedRecipe(ws.recording!, recordingIdOf(ws.recording!, ws.fingerprint), recipe);
      const built = await summarizeRecording(ws.recording!, recipe, {
        planned,
        onProgress: (done, n) => set({ saving: { state: 'saving', message: `Computing the summary of version ${current!.number} on this device: ${done} of ${n} channels…` } }),
      });
      notices = built.notices.map((n) => n.replace(/^summary: /, ''));
      const upload = await readAnswer<{ summaryHash: string }>(await send(`/api/analysis-sessions/${session.id}/recipe-versions/${current.number}/summary`, { method: 'PUT', json: built.summary }));
      if (!upload.ok && upload.code !== 'summary_exists') return set({ saving: { state: 'failed', message: `Version ${current.number} is saved, but its summary was not: ${upload.message}` } });
      await refreshSession();
    }
    const after = get().current;
    set({ match: { ...get().match, message: null }, saving: { state: 'saved', message: `Saved as version ${after?.number ?? current.number} with its summary (SHA-256 ${(after?.summaryHash ?? '').slice(0, 12)}…).${notices.length > 0 ? ` Note: ${notices.join('; ')}.` : ''}` }, autosave: { ...get().autosave, state: 'idle', message: null } });
  } catch (error) {
    set({ saving: { state: 'failed', message: error instanceof Error && !(error instanceof OutboundRefusedError) && !(error instanceof TypeError) ? `The summary could not be computed: ${error.message}` : failureWords(error) } });
  }
}

// ---- autosave ----------------------------------------------------------------------------------------------------

const RECIPE_FIELDS = ['draft', 'conditions', 'epochWindow', 'rejection', 'conditioning', 'eventSelection', 'baseline', 'method', 'scope', 'spread', 'fitRange'] as const;

function recipeInputsChanged(a: WorkspaceState, b: WorkspaceState): boolean {
  return RECIPE_FIELDS.some((f) => a[f] !== b[f]);
}

let autosaveTimer: ReturnType<typeof setTimeout> | null = null;

function cancelAutosave(): void {
  if (autosaveTimer !== null) clearTimeout(autosaveTimer);
  autosaveTimer = null;
}

/** Autosave on or off for this tab (on by default). */
export function setAutosave(enabled: boolean): void {
  set({ autosave: { enabled, state: 'idle', message: enabled ? null : 'Autosave is off: “Save as version” saves.' } });
  if (enabled) scheduleAutosave();
  else cancelAutosave();
}

/**
 * After a quiet spell, queues the workspace's recipe as the session's next version through the outbox (kept in
 * IndexedDB, sent once). Only for the owner, on the session's recording, while the session is a draft or returned
 * (a signed-off session becomes a draft again only by an explicit save), and one queued draft at a time.
 */
function scheduleAutosave(): void {
  cancelAutosave();
  const s = get();
  if (!s.autosave.enabled || s.session === null || !mayEditSession(s) || !recordingFits()) return;
  if (s.session.status !== 'draft' && s.session.status !== 'returned') return;
  autosaveTimer = setTimeout(() => void autosaveNow(), AUTOSAVE_QUIET_MS);
}

async function autosaveNow(): Promise<void> {
  autosaveTimer = null;
  const { session, userId, current } = get();
  if (session === null || userId === null || get().saving.state === 'saving') return;
  const recipe = recipeOf(useWorkspace.getState());
  const ours = canonicalRecipe(recipe);
  if (ours === null || ours === appliedCanonical || (current !== null && canonicalize(current.recipe) === ours)) return;
  const box = reviewOutbox(userId);
  if (box.list().some((i) => i.sessionId === session.id && i.kind === 'recipe-draft' && i.state !== 'refused')) {
    set({ autosave: { ...get().autosave, state: 'waiting', message: 'An earlier autosave still waits to be sent.' } });
    return;
  }
  appliedCanonical = ours;
  await queueRecipeDraft(userId, session.id, current?.number ?? null, recipe as Record<string, unknown>);
  set({ autosave: { ...get().autosave, state: 'queued', message: `Recipe autosaved as a new version (without a summary) at ${new Date().toISOString().slice(11, 19)} UTC; “Save as version” adds its summary.` } });
}

// ---- notes on the maps -----------------------------------------------------------------------------------------

/** Starts or stops drawing a region on the maps to pin a note. */
export function setPinMode(on: boolean): void {
  set({ pinMode: on, ...(on ? {} : { pending: null }) });
}

/** A region was drawn (or a point clicked) on a map: the note form opens for it. */
export function startPin(anchor: NoteAnchor): void {
  set({ pending: anchor, selectedNoteId: null });
}

export function cancelPin(): void {
  set({ pending: null });
}

/** Posts the pending pin's note through the outbox (kept here first, sent once); returns a problem or null. */
export async function postPinnedNote(body: string): Promise<string | null> {
  const { session, userId, pending } = get();
  if (session === null || userId === null || pending === null) return 'Draw a region on a map first.';
  if (session.currentVersion === null) return 'Save a recipe version first: a note on the maps points into a version.';
  const text = body.trim();
  if (text === '') return 'Write the note first.';
  if (text.length > 4000) return 'A note holds at most 4000 characters.';
  try {
    await postNote(userId, session.id, { body: text, recipeVersion: session.currentVersion, anchor: pending });
  } catch (error) {
    return failureWords(error);
  }
  set({ pending: null, pinMode: false });
  return null;
}

/** Shows a listed note: the maps move to its channel and condition, and its region is highlighted. */
export function chooseNote(noteId: string | null): void {
  set({ selectedNoteId: noteId, pending: null });
  if (noteId === null) return;
  const note = get().notes.find((n) => n.id === noteId);
  const anchor = note?.anchor;
  if (!anchor) return;
  const patch: Partial<WorkspaceState> = { compareTo: null };
  if (anchor.channel) patch.channel = anchor.channel;
  if (anchor.condition) patch.condition = anchor.condition;
  useWorkspace.getState().set(patch);
}
