/**
 * The header's sign-out form: when "also remove the recordings kept in this browser" is ticked, this account's
 * library database and its saved workspaces (workspace/saved-workspaces.ts: settings and decisions per recording)
 * are deleted before the form posts. Loaded as a bundled module file (no inline script: the CSP
 * allows scripts from this origin only).
 *
 * deleteDatabase waits until every connection to the database has closed; the library closes its own on
 * "versionchange" (W3C Indexed Database API 3.0 §2.8), so only a page without that handler can block it. If the
 * deletion does not finish in time, the form is not posted and the person is told why.
 */
import { libraryDatabaseName } from './library-names';
import { workspaceDatabaseName } from './workspace/saved-names';

const WAIT_MS = 5000;

function deleteDatabase(name: string): Promise<void> {
  return new Promise((resolve, reject) => {
    const request = indexedDB.deleteDatabase(name);
    const timer = setTimeout(() => reject(new Error('another Tidemark tab keeps the library open; close it and sign out again')), WAIT_MS);
    request.onsuccess = () => {
      clearTimeout(timer);
      resolve();
    };
    request.onerror = () => {
      clearTimeout(timer);
      reject(request.error ?? new Error('the browser refused to delete the library'));
    };
  });
}

function wire(form: HTMLFormElement): void {
  const owner = form.dataset.libraryOwner;
  const box = form.querySelector<HTMLInputElement>('input[name="forget-library"]');
  const status = form.querySelector<HTMLElement>('[data-sign-out-status]');
  if (!owner || !box) return;
  let removed = false;
  form.addEventListener('submit', (event) => {
    if (!box.checked || removed || typeof indexedDB === 'undefined') return;
    event.preventDefault();
    const button = form.querySelector<HTMLButtonElement>('button[type="submit"]');
    if (button) button.disabled = true;
    if (status) status.textContent = 'Removing the recordings kept in this browser…';
    Promise.all([deleteDatabase(libraryDatabaseName(owner)), deleteDatabase(workspaceDatabaseName(owner))]).then(
      () => {
        removed = true;
        form.dataset.libraryRemoved = 'yes';
        form.submit();
      },
      (error: unknown) => {
        if (button) button.disabled = false;
        if (status) status.textContent = `Not signed out: the recordings could not be removed (${error instanceof Error ? error.message : String(error)}). Untick the box to sign out and keep them.`;
      },
    );
  });
}

for (const form of document.querySelectorAll<HTMLFormElement>('form[data-library-owner]')) wire(form);
