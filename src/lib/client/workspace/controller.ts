import { create, type StoreApi, type UseBoundStore } from 'zustand';
import { changedFields, EDIT_FIELDS, editsOf, GLIDING_FIELDS, patchFor, savedEditsOf, type EditField, type WorkspaceEdits } from './edits';
import type { SavedWorkspace, WorkspaceShelf } from './saved-workspaces';
import type { WorkspaceState } from './store';

/** What the screens show about history and saving (read with `useWorkspaceMemory`). */
export interface WorkspaceMemory {
  canUndo: boolean;
  canRedo: boolean;
  /** Set when the open recording's workspace was brought back from this browser: the time it was saved. */
  restoredFrom: string | null;
  /** The last save of this recording's workspace in this browser, or null. */
  savedAt: string | null;
  /** Why the last save or restore failed, or null. */
  problem: string | null;
  /**
   * A workspace saved in this browser for the open recording that was found only after the person had already
   * edited it (a large file's fingerprint arrives after it is shown): offered, never put in place unasked.
   */
  offer: { savedAt: string } | null;
}

interface Step {
  /** The edits this step returns to: before the edit (undo list), or after it (redo list). */
  before: WorkspaceEdits;
  fields: EditField[];
  at: number;
}

export interface ControllerOptions {
  store: UseBoundStore<StoreApi<WorkspaceState>>;
  /** Changes of the same gliding field within this many ms are one undo step. */
  glideMs?: number;
  /** Quiet time before a save. */
  saveDelayMs?: number;
  /** Steps kept for undo. */
  depth?: number;
  now?: () => number;
}

/**
 * The workspace controller's memory: undo and redo of every edit (edits.ts lists them) and the workspace saved in
 * this browser per account and recording. It watches the one store: any change of an edit field, whichever screen
 * made it, is a step; opening a recording starts afresh and brings back what was saved for it.
 */
export class WorkspaceHistory {
  readonly memory = create<WorkspaceMemory>(() => ({ canUndo: false, canRedo: false, restoredFrom: null, savedAt: null, problem: null, offer: null }));
  private readonly store: UseBoundStore<StoreApi<WorkspaceState>>;
  private readonly glideMs: number;
  private readonly saveDelayMs: number;
  private readonly depth: number;
  private readonly now: () => number;
  private past: Step[] = [];
  private future: Step[] = [];
  private last: WorkspaceEdits;
  /** The edits as they were just after the recording was opened: "start clean" returns to them. */
  private opened: WorkspaceEdits;
  private applying = false;
  private opening = false;
  private openCount: number;
  private shelf: WorkspaceShelf | null = null;
  private timer: ReturnType<typeof setTimeout> | null = null;
  /** Edits not saved yet; they wait here while the open recording's fingerprint (the shelf's key) is unknown. */
  private dirty = false;
  /** The fingerprint as last seen in the store: a change from null within one opening is a late fingerprint. */
  private fingerprint: string | null;
  /** Set while the saved workspace of the open recording is being looked up: saves wait for the lookup. */
  private lookingUp = false;
  /** The saved workspace behind `memory.offer`. */
  private offered: SavedWorkspace | null = null;
  private unsubscribe: () => void;

  constructor(options: ControllerOptions) {
    this.store = options.store;
    this.glideMs = options.glideMs ?? 800;
    this.saveDelayMs = options.saveDelayMs ?? 400;
    this.depth = options.depth ?? 200;
    this.now = options.now ?? (() => Date.now());
    const state = this.store.getState();
    this.last = editsOf(state);
    this.opened = this.last;
    this.openCount = state.openCount;
    this.fingerprint = state.fingerprint;
    this.unsubscribe = this.store.subscribe((s) => this.observe(s));
  }

  /** Stops watching the store (tests). */
  detach(): void {
    this.unsubscribe();
    if (this.timer !== null) clearTimeout(this.timer);
  }

  /** Where this account's workspaces are saved; null saves nothing. A recording already open is looked up. */
  useShelf(shelf: WorkspaceShelf | null): void {
    this.shelf = shelf;
    const fp = this.store.getState().fingerprint;
    if (shelf !== null && fp !== null && this.store.getState().recording !== null) void this.restore(fp, this.openCount);
  }

  private observe(state: WorkspaceState): void {
    if (state.openCount !== this.openCount) {
      // A recording was opened: history starts here; changes made in the same turn belong to the opening.
      this.openCount = state.openCount;
      this.fingerprint = state.fingerprint;
      this.past = [];
      this.future = [];
      this.dirty = false;
      this.opening = true;
      this.offered = null;
      this.last = editsOf(state);
      this.memory.setState({ restoredFrom: null, savedAt: null, problem: null, offer: null });
      this.publish();
      const count = state.openCount;
      queueMicrotask(() => {
        this.opening = false;
        this.opened = editsOf(this.store.getState());
        this.last = this.opened;
        // A fingerprint still being computed is looked up when it arrives (below).
        const fp = this.store.getState().fingerprint;
        if (fp !== null && this.shelf !== null) void this.restore(fp, count);
      });
      return;
    }
    if (state.fingerprint !== this.fingerprint) {
      const arrived = this.fingerprint === null && state.fingerprint !== null;
      this.fingerprint = state.fingerprint;
      // The late fingerprint of the open recording: look up its saved workspace, then save what waited for it.
      if (arrived && !this.opening && this.shelf !== null) void this.restore(state.fingerprint!, state.openCount);
    }
    const now = editsOf(state);
    const fields = changedFields(this.last, now);
    if (fields.length === 0) return;
    if (this.applying || this.opening) {
      this.last = now;
      return;
    }
    const top = this.past[this.past.length - 1];
    const t = this.now();
    const glides = top !== undefined && this.future.length === 0 && t - top.at < this.glideMs && fields.every((f) => GLIDING_FIELDS.has(f)) && sameSet(fields, top.fields);
    if (glides) top.at = t;
    else {
      this.past.push({ before: this.last, fields, at: t });
      if (this.past.length > this.depth) this.past.shift();
    }
    this.future = [];
    this.last = now;
    this.publish();
    this.scheduleSave();
  }

  private publish(): void {
    const canUndo = this.past.length > 0;
    const canRedo = this.future.length > 0;
    // Only a change: a baseline drag is an edit per move, and each new memory state re-renders the undo bar.
    const m = this.memory.getState();
    if (m.canUndo !== canUndo || m.canRedo !== canRedo) this.memory.setState({ canUndo, canRedo });
  }

  private put(edits: WorkspaceEdits): void {
    this.applying = true;
    try {
      this.store.setState(patchFor(this.store.getState(), edits));
    } finally {
      this.applying = false;
    }
    this.last = editsOf(this.store.getState());
  }

  /** Walks back one edit; false when there is none. */
  undo(): boolean {
    const step = this.past.pop();
    if (step === undefined) return false;
    this.future.push({ before: this.last, fields: step.fields, at: this.now() });
    this.put(step.before);
    this.publish();
    this.scheduleSave();
    return true;
  }

  /** Walks forward one undone edit; false when there is none. */
  redo(): boolean {
    const step = this.future.pop();
    if (step === undefined) return false;
    // The redone step can glide no further: its time is in the past.
    this.past.push({ before: this.last, fields: step.fields, at: -Infinity });
    this.put(step.before);
    this.publish();
    this.scheduleSave();
    return true;
  }

  /** Forgets the saved workspace of the open recording and returns to how it was just after opening. */
  async startClean(): Promise<void> {
    const fp = this.store.getState().fingerprint;
    if (this.timer !== null) clearTimeout(this.timer);
    this.timer = null;
    this.dirty = false;
    this.past = [];
    this.future = [];
    this.offered = null;
    this.put(this.opened);
    this.memory.setState({ restoredFrom: null, savedAt: null, problem: null, offer: null });
    this.publish();
    if (fp !== null && this.shelf !== null) {
      try {
        await this.shelf.forget(fp);
      } catch (error) {
        this.memory.setState({ problem: `The saved workspace could not be removed from this browser: ${messageOf(error)}` });
      }
    }
  }

  /**
   * Looks up the saved workspace of the open recording. Untouched since opening: it is put in place ("Restored
   * from …"). Already edited (possible while a large file's fingerprint was computed): it is offered instead, and
   * the edits stay. Then whatever waited for the fingerprint is saved.
   */
  private async restore(fingerprint: string, count: number): Promise<void> {
    const shelf = this.shelf;
    if (shelf === null) return;
    let saved: SavedWorkspace | undefined;
    this.lookingUp = true;
    try {
      saved = await shelf.load(fingerprint);
    } catch (error) {
      this.memory.setState({ problem: `The workspace saved in this browser could not be read: ${messageOf(error)}` });
    } finally {
      this.lookingUp = false;
    }
    // Another recording opened meanwhile: leave it.
    if (this.store.getState().openCount !== count || this.store.getState().fingerprint !== fingerprint) return;
    if (saved !== undefined) {
      const edited = this.dirty || this.past.length > 0 || this.future.length > 0;
      const edits = savedEditsOf(saved.edits, this.opened);
      if (!edited) {
        this.put(edits);
        this.memory.setState({ restoredFrom: saved.savedAt, savedAt: saved.savedAt, problem: null });
      } else if (differ(edits, editsOf(this.store.getState()))) {
        this.offered = saved;
        this.memory.setState({ offer: { savedAt: saved.savedAt } });
      }
    }
    if (this.dirty) await this.flush();
  }

  /** Puts the offered saved workspace in place, as one undoable step (undo returns to the edits made before). */
  takeOffer(): void {
    const saved = this.offered;
    if (saved === null) return;
    this.offered = null;
    this.past.push({ before: this.last, fields: [...EDIT_FIELDS], at: -Infinity });
    if (this.past.length > this.depth) this.past.shift();
    this.future = [];
    this.put(savedEditsOf(saved.edits, this.opened));
    this.memory.setState({ offer: null, restoredFrom: saved.savedAt });
    this.publish();
    this.scheduleSave();
  }

  /** Leaves the offered saved workspace; the next save replaces it with the edits on screen. */
  dismissOffer(): void {
    this.offered = null;
    this.memory.setState({ offer: null });
  }

  private scheduleSave(): void {
    if (this.shelf === null) return;
    this.dirty = true;
    if (this.timer !== null) clearTimeout(this.timer);
    // Without a fingerprint (still computed) the edits wait, marked dirty; its arrival saves them.
    if (this.store.getState().fingerprint === null || this.lookingUp) return;
    this.timer = setTimeout(() => void this.flush(), this.saveDelayMs);
  }

  /** Saves now what is waiting to be saved (also called when the page is hidden). */
  async flush(): Promise<void> {
    if (this.timer !== null) clearTimeout(this.timer);
    this.timer = null;
    const fp = this.store.getState().fingerprint;
    if (!this.dirty || this.shelf === null || fp === null || this.lookingUp) return;
    this.dirty = false;
    const saved: SavedWorkspace = { format: 1, savedAt: new Date(this.now()).toISOString(), edits: editsOf(this.store.getState()) };
    try {
      await this.shelf.save(fp, saved);
      if (this.store.getState().fingerprint === fp) this.memory.setState({ savedAt: saved.savedAt, problem: null });
    } catch (error) {
      this.memory.setState({ problem: `The workspace could not be saved in this browser (${messageOf(error)}); it is still open here.` });
    }
  }
}

/** Whether two sets of edits differ in any value (not just by reference). */
function differ(a: WorkspaceEdits, b: WorkspaceEdits): boolean {
  return EDIT_FIELDS.some((f) => a[f] !== b[f] && JSON.stringify(a[f]) !== JSON.stringify(b[f]));
}

function sameSet(a: readonly string[], b: readonly string[]): boolean {
  return a.length === b.length && a.every((x) => b.includes(x));
}

function messageOf(error: unknown): string {
  return error instanceof Error ? error.message : String(error);
}
