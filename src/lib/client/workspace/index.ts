// The workspace controller: one owner for the recording, the whole recipe, the view, the results and their
// memory (undo, redo, saved in this browser). Screens read `useWorkspace` / `useResultsStore` through selectors and
// `useWorkspaceMemory`, and start work only through the functions exported here.
import { WorkspaceHistory } from './controller';
import { browserShelf } from './saved-workspaces';
import { useWorkspace } from './store';

export { useWorkspace, recipeOf, type WorkspaceState } from './store';
export { historyKeyOf } from './keys';

/** The one history of the one workspace store in this tab. */
export const workspaceHistory = new WorkspaceHistory({ store: useWorkspace });
export const useWorkspaceMemory = workspaceHistory.memory;

/** Saves and restores the workspace of account `userId` (its own IndexedDB database); nothing without IndexedDB. */
export function bindAccount(userId: string): void {
  workspaceHistory.useShelf(typeof indexedDB === 'undefined' ? null : browserShelf(userId));
}

export const undo = (): boolean => workspaceHistory.undo();
export const redo = (): boolean => workspaceHistory.redo();
export const startClean = (): Promise<void> => workspaceHistory.startClean();
export const takeSavedOffer = (): void => workspaceHistory.takeOffer();
export const keepOwnEdits = (): void => workspaceHistory.dismissOffer();
export const saveNow = (): Promise<void> => workspaceHistory.flush();
