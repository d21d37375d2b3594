import { create, type StoreApi, type UseBoundStore } from 'zustand';
import { changedFields, editsOf, GLIDING_FIELDS, patchFor, savedEditsOf, type EditField, type WorkspaceEdits } from './edits';
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
  readonly memory = create<WorkspaceMemory>(() => ({ canUndo: false, canRedo: false, restoredFrom: null, savedAt: null, problem: null }));
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
  private dirty = false;
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
      this.past = [];
      this.future = [];
      this.dirty = false;
      this.opening = true;
      this.last = editsOf(state);
      this.memory.setState({ restoredFrom: null, savedAt: null, problem: null });
      this.publish();
      const count = state.openCount;
      queueMicrotask(() => {
        this.opening = false;
        this.opened = editsOf(this.store.getState());
        this.last = this.opened;
        const fp = this.store.getState().fingerprint;
        if (fp !== null && this.shelf !== null) void this.restore(fp, count);
      });
      return;
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
    this.memory.setState({ canUndo: this.past.length > 0, canRedo: this.future.length > 0 });
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
    this.put(this.opened);
    this.memory.setState({ restoredFrom: null, savedAt: null, problem: null });
    this.publish();
    if (fp !== null && this.shelf !== null) {
      try {
        await this.shelf.forget(fp);
      } catch (error) {
        this.memory.setState({ problem: `The saved workspace could not be removed from this browser: ${messageOf(error)}` });
      }
    }
  }

  private async restore(fingerprint: string, count: number): Promise<void> {
    const shelf = this.shelf;
    if (shelf === null) return;
    let saved: SavedWorkspace | undefined;
    try {
      saved = await shelf.load(fingerprint);
    } catch (error) {
      this.memory.setState({ problem: `The workspace saved in this browser could not be read: ${messageOf(error)}` });
      return;
    }
    // Another recording opened meanwhile, or the person already edited this one: leave it.
    if (saved === undefined || this.store.getState().openCount !== count || this.past.length > 0 || this.store.getState().fingerprint !== fingerprint) return;
    this.put(savedEditsOf(saved.edits, this.opened));
    this.memory.setState({ restoredFrom: saved.savedAt, savedAt: saved.savedAt, problem: null });
  }

  private scheduleSave(): void {
    if (this.shelf === null || this.store.getState().fingerprint === null) return;
    this.dirty = true;
    if (this.timer !== null) clearTimeout(this.timer);
    this.timer = setTimeout(() => void this.flush(), this.saveDelayMs);
  }

  /** Saves now what is waiting to be saved (also called when the page is hidden). */
  async flush(): Promise<void> {
    if (this.timer !== null) clearTimeout(this.timer);
    this.timer = null;
    const fp = this.store.getState().fingerprint;
    if (!this.dirty || this.shelf === null || fp === null) return;
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

function sameSet(a: readonly string[], b: readonly string[]): boolean {
  return a.length === b.length && a.every((x) => b.includes(x));
}

function messageOf(error: unknown): string {
  return error instanceof Error ? error.message : String(error);
}
