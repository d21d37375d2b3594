/**
 * The review outbox: notes, replies and recipe drafts written while the server cannot be reached wait in this
 * browser's IndexedDB (idb-keyval; one database per account, `tidemark-outbox:<user id>`) and are sent when it
 * answers again — on the browser's "online" event, every few seconds while anything waits, and when a page opens.
 *
 * Exactly once: every item carries a `clientKey` (a UUID chosen when it was written). Notes and replies send it to
 * the API, which stores a post once per author and key and answers a repeat with the stored note (200). A recipe
 * draft has no key on the server; a repeat after a lost answer meets 409 `stale_version`, and when the current
 * version holds exactly our recipe (RFC 8785 canonical JSON compared) it is taken as delivered.
 *
 * An item is removed only after the server confirmed it; one the server refuses for its content stays, marked
 * "refused" with the reason, until the person discards it: nothing written is lost silently.
 */
import canonicalize from 'canonicalize';
import { createStore, del, entries, set, type UseStore } from 'idb-keyval';
import { RecipeSchema } from '../../analysis/recipe';
import { OutboundRefusedError, send } from '../outbound';
import { plainRefusal } from './actions';

export type OutboxKind = 'note' | 'reply' | 'recipe-draft';
export type OutboxState = 'waiting' | 'sending' | 'refused';

export interface OutboxItem {
  clientKey: string;
  kind: OutboxKind;
  sessionId: string;
  /** Same-origin API path the item is posted to. */
  path: string;
  body: Record<string, unknown>;
  queuedAt: string;
  attempts: number;
  state: OutboxState;
  /** Why it waits or was refused, in plain words; null before the first try. */
  problem: string | null;
}

export interface Delivery {
  item: OutboxItem;
  /** The server's answer body (e.g. `{ note }`), parsed. */
  answer: unknown;
}

const RETRY_MS = 4_000;

export function outboxDatabaseName(userId: string): string {
  return `tidemark-outbox:${userId}`;
}

export function newClientKey(): string {
  return crypto.randomUUID();
}

type Listener = () => void;

export class ReviewOutbox {
  private readonly store: UseStore;
  private items = new Map<string, OutboxItem>();
  private listeners = new Set<Listener>();
  private deliveredListeners = new Set<(d: Delivery) => void>();
  private loaded: Promise<void>;
  private flushing: Promise<void> | null = null;
  private timer: ReturnType<typeof setTimeout> | null = null;
  private started = false;

  constructor(readonly userId: string) {
    this.store = createStore(outboxDatabaseName(userId), 'items');
    this.loaded = entries<string, OutboxItem>(this.store).then(
      (rows) => {
        for (const [key, item] of rows) this.items.set(key, { ...item, state: item.state === 'sending' ? 'waiting' : item.state });
        this.publish();
      },
      () => {
        // IndexedDB unavailable (private window with storage off): the outbox works in memory for this page only.
      },
    );
  }

  private snapshot: OutboxItem[] | null = null;

  /** Items in the order they were written (the same array until something changes, for useSyncExternalStore). */
  list(): OutboxItem[] {
    this.snapshot ??= [...this.items.values()].sort((a, b) => a.queuedAt.localeCompare(b.queuedAt));
    return this.snapshot;
  }

  subscribe(listener: Listener): () => void {
    this.listeners.add(listener);
    return () => this.listeners.delete(listener);
  }

  onDelivered(listener: (d: Delivery) => void): () => void {
    this.deliveredListeners.add(listener);
    return () => this.deliveredListeners.delete(listener);
  }

  private publish() {
    this.snapshot = null;
    for (const l of this.listeners) l();
  }

  private async save(item: OutboxItem) {
    this.items.set(item.clientKey, item);
    this.publish();
    await set(item.clientKey, item, this.store).catch(() => {});
  }

  private async remove(clientKey: string) {
    this.items.delete(clientKey);
    this.publish();
    await del(clientKey, this.store).catch(() => {});
  }

  /** Starts retrying: now, on "online", and every few seconds while something waits. */
  start(): void {
    if (this.started || typeof window === 'undefined') return;
    this.started = true;
    window.addEventListener('online', () => void this.flush());
    void this.loaded.then(() => this.flush());
  }

  /** Keeps the item first (so a closed tab loses nothing), then tries to send it at once. */
  async enqueue(kind: OutboxKind, sessionId: string, path: string, body: Record<string, unknown>, clientKey = newClientKey()): Promise<OutboxItem> {
    await this.loaded;
    const item: OutboxItem = { clientKey, kind, sessionId, path, body: kind === 'recipe-draft' ? body : { ...body, clientKey }, queuedAt: new Date().toISOString(), attempts: 0, state: 'waiting', problem: null };
    await this.save(item);
    void this.flush();
    return item;
  }

  /** Drops an item the person no longer wants sent (a refused one, usually). */
  async discard(clientKey: string): Promise<void> {
    await this.remove(clientKey);
  }

  /** Sends every waiting item once, in order; one flush at a time. */
  flush(): Promise<void> {
    if (this.flushing) return this.flushing;
    this.flushing = (async () => {
      try {
        await this.loaded;
        for (const item of this.list()) {
          if (item.state === 'refused') continue;
          const stop = await this.deliver(item);
          if (stop) break; // the server is unreachable: the rest would fail the same way
        }
      } finally {
        this.flushing = null;
        this.schedule();
      }
    })();
    return this.flushing;
  }

  private schedule() {
    if (this.timer !== null) clearTimeout(this.timer);
    this.timer = null;
    if (!this.started || !this.list().some((i) => i.state === 'waiting')) return;
    this.timer = setTimeout(() => void this.flush(), RETRY_MS);
  }

  /** One try; resolves true when the server could not be reached (stop this round). */
  private async deliver(item: OutboxItem): Promise<boolean> {
    const sending = { ...item, state: 'sending' as const, attempts: item.attempts + 1 };
    this.items.set(item.clientKey, sending);
    this.publish();
    let response: Response;
    try {
      response = await send(item.path, { json: item.body });
    } catch (error) {
      if (error instanceof OutboundRefusedError) {
        await this.save({ ...sending, state: 'refused', problem: `${error.message} It was not sent.` });
        return false;
      }
      await this.save({ ...sending, state: 'waiting', problem: 'The server cannot be reached; it will be sent when it answers.' });
      return true;
    }
    let answer: unknown = null;
    try {
      answer = await response.json();
    } catch {
      // not JSON (a proxy's error page)
    }
    if (response.ok) {
      await this.remove(item.clientKey);
      for (const l of this.deliveredListeners) l({ item, answer });
      return false;
    }
    const error = (answer as { error?: { code?: string; message?: string } } | null)?.error;
    if (item.kind === 'recipe-draft' && response.status === 409 && error?.code === 'stale_version' && sameRecipe((answer as { current?: { recipe?: unknown } }).current?.recipe, item.body.recipe)) {
      // Our earlier try was stored; only its answer was lost.
      await this.remove(item.clientKey);
      for (const l of this.deliveredListeners) l({ item, answer });
      return false;
    }
    if (response.status >= 500 || response.status === 401 || response.status === 408 || response.status === 429) {
      const problem = response.status === 401 ? 'Your sign-in has ended: sign in again and it will be sent.' : `The server is not ready (${response.status}); it will be sent when it answers.`;
      await this.save({ ...sending, state: 'waiting', problem });
      return true;
    }
    await this.save({ ...sending, state: 'refused', problem: plainRefusal(response.status, error?.code, error?.message) });
    return false;
  }
}

/** The recipe as the server stores it (the schema's output), compared by RFC 8785 canonical form. */
function sameRecipe(stored: unknown, ours: unknown): boolean {
  if (stored === undefined || stored === null) return false;
  const parsed = RecipeSchema.safeParse(ours);
  if (!parsed.success) return false;
  return canonicalize(stored) === canonicalize(parsed.data);
}

const outboxes = new Map<string, ReviewOutbox>();

/** The page's one outbox for this account (started on first use). */
export function reviewOutbox(userId: string): ReviewOutbox {
  let box = outboxes.get(userId);
  if (!box) {
    box = new ReviewOutbox(userId);
    outboxes.set(userId, box);
  }
  box.start();
  return box;
}
