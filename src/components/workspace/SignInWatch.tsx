/**
 * Sign-in watch for the workspace: keeps an eye on this tab's sign-in session so that a session ending never costs
 * the open recording or the analysis held in memory.
 *
 * - Asks GET /api/session every minute and when the tab regains focus (asking is not activity: it does not keep the
 *   session alive).
 * - A few minutes before the idle limit, a non-modal notice offers "Keep me signed in" (POST /api/session/keep, a
 *   request that counts as activity). Before the absolute limit it only says when the sign-in will end.
 * - When the session has ended (the status says so, or any request of the workspace was answered 401), a modal
 *   dialog signs in again in place (POST /api/session) without navigating; the stores are untouched. The server
 *   refuses another account than the one whose work is open.
 * Every request goes through `send`, so the Outbound screen lists them (the password shown as hidden).
 */
import { useCallback, useEffect, useRef, useState, type FormEvent } from 'react';
import { errorMessageOf, outboundLog, send, subscribeOutbound } from '../../lib/client/outbound';

/** How often the status is asked for. */
const POLL_MS = 60_000;
/** The notice shows this long before the idle limit. */
export const WARN_SECONDS = 5 * 60;

interface Person {
  id: string;
  email: string;
  displayName: string;
}
interface Status {
  user: Person;
  idleSecondsLeft: number;
  absoluteSecondsLeft: number;
  idleMinutes: number;
  absoluteMinutes: number;
}
type Reason = 'idle' | 'absolute' | 'disabled' | 'none';

export default function SignInWatch() {
  /** The last status and the local time it arrived (seconds left are counted down from there). */
  const [status, setStatus] = useState<{ value: Status; at: number } | null>(null);
  const [ended, setEnded] = useState<{ reason: Reason; message: string } | null>(null);
  const [dismissed, setDismissed] = useState(false);
  const [now, setNow] = useState(() => Date.now());
  const [email, setEmail] = useState('');
  const [password, setPassword] = useState('');
  const [problem, setProblem] = useState('');
  const [busy, setBusy] = useState(false);
  const [announce, setAnnounce] = useState('');
  const person = useRef<Person | null>(null);
  const dialog = useRef<HTMLDialogElement>(null);
  const passwordField = useRef<HTMLInputElement>(null);

  const take = useCallback(async (response: Response) => {
    if (response.ok) {
      const value = (await response.json()) as Status;
      person.current = value.user;
      setEmail((e) => e || value.user.email);
      setStatus({ value, at: Date.now() });
      setNow(Date.now());
      setEnded(null);
      return;
    }
    if (response.status === 401) {
      const body = (await response.json().catch(() => null)) as { error?: { reason?: Reason; message?: string } } | null;
      setEnded((current) => current ?? { reason: body?.error?.reason ?? 'none', message: body?.error?.message ?? 'Your sign-in has ended.' });
    }
  }, []);

  const poll = useCallback(async () => {
    try {
      await take(await send('/api/session'));
    } catch {
      // Offline or the server is restarting: the next poll tries again.
    }
  }, [take]);

  // Poll every minute and on focus; count down every 15 s.
  useEffect(() => {
    void poll();
    const timer = window.setInterval(() => void poll(), POLL_MS);
    const tick = window.setInterval(() => setNow(Date.now()), 15_000);
    const onFocus = () => void poll();
    const onVisible = () => document.visibilityState === 'visible' && void poll();
    window.addEventListener('focus', onFocus);
    document.addEventListener('visibilitychange', onVisible);
    return () => {
      window.clearInterval(timer);
      window.clearInterval(tick);
      window.removeEventListener('focus', onFocus);
      document.removeEventListener('visibilitychange', onVisible);
    };
  }, [poll]);

  // Any other request of the workspace answered 401 means the session is gone.
  useEffect(() => {
    let seen = outboundLog().at(-1)?.id ?? 0;
    return subscribeOutbound(() => {
      for (const entry of outboundLog()) {
        if (entry.id <= seen || entry.status === null) continue;
        seen = Math.max(seen, entry.id);
        if (entry.status === 401 && !entry.path.startsWith('/api/session')) {
          setEnded((current) => current ?? { reason: 'none', message: 'Your sign-in has ended (the server answered a request with "sign in first").' });
        }
      }
    });
  }, []);

  // The dialog is modal while the session is ended and not put aside.
  useEffect(() => {
    const d = dialog.current;
    if (!d) return;
    if (ended && !dismissed && !d.open) {
      d.showModal();
      passwordField.current?.focus();
    } else if ((!ended || dismissed) && d.open) d.close();
  }, [ended, dismissed]);

  const signInAgain = async (event: FormEvent) => {
    event.preventDefault();
    if (!password) {
      setProblem('Enter your password.');
      passwordField.current?.focus();
      return;
    }
    setBusy(true);
    setProblem('');
    const body = { email, password, ...(person.current ? { expectedUserId: person.current.id } : {}) };
    try {
      const response = await send('/api/session', { method: 'POST', json: body, logBodyAs: JSON.stringify({ ...body, password: '(hidden here)' }) });
      if (response.ok) {
        setPassword('');
        setDismissed(false);
        await take(response);
        setAnnounce('Signed in again. Your recording and results are as you left them.');
      } else {
        setProblem(await errorMessageOf(response));
        passwordField.current?.focus();
      }
    } catch {
      setProblem('The server could not be reached. Check the connection and try again.');
    } finally {
      setBusy(false);
    }
  };

  const keep = async () => {
    try {
      await take(await send('/api/session/keep', { method: 'POST' }));
    } catch {
      // The next poll tells.
    }
  };

  let notice: { text: string; canKeep: boolean } | null = null;
  if (status && !ended) {
    const elapsed = (now - status.at) / 1000;
    const idleLeft = status.value.idleSecondsLeft - elapsed;
    const absoluteLeft = status.value.absoluteSecondsLeft - elapsed;
    const minutes = (s: number) => Math.max(1, Math.ceil(s / 60));
    const plural = (n: number) => `${n} minute${n === 1 ? '' : 's'}`;
    if (absoluteLeft <= idleLeft && absoluteLeft <= WARN_SECONDS) {
      notice = { text: `Your sign-in reaches its time limit in ${plural(minutes(absoluteLeft))}. You can then sign in again here; the open recording stays.`, canKeep: false };
    } else if (idleLeft <= WARN_SECONDS) {
      notice = { text: `Still there? Your sign-in ends in ${plural(minutes(idleLeft))}.`, canKeep: true };
    }
  }

  // Past the limit by the local count: ask now rather than at the next poll.
  useEffect(() => {
    if (status && !ended && status.value.idleSecondsLeft - (now - status.at) / 1000 <= 0) void poll();
  }, [now, status, ended, poll]);

  return (
    <>
      <p className="sr-only" role="status" aria-live="polite">{announce}</p>
      {notice && (
        <div role="status" aria-live="polite" data-testid="signin-notice" className="fixed bottom-4 right-4 z-30 max-w-sm rounded border border-shell bg-foam p-4 text-sm shadow-lg">
          <p>{notice.text}</p>
          {notice.canKeep && (
            <button type="button" className="btn btn-primary mt-3" data-testid="signin-keep" onClick={() => void keep()}>
              Keep me signed in
            </button>
          )}
        </div>
      )}
      {ended && dismissed && (
        <div role="alert" data-testid="signin-ended-banner" className="notice notice-warn fixed bottom-4 right-4 z-30 max-w-sm text-sm shadow-lg">
          <p>You are signed out. Nothing in this tab was lost, but nothing can be saved to the server until you sign in again.</p>
          <button type="button" className="btn btn-primary mt-3" onClick={() => setDismissed(false)}>
            Sign in again
          </button>
        </div>
      )}
      <dialog
        ref={dialog}
        aria-labelledby="signin-again-title"
        aria-describedby="signin-again-why"
        data-testid="signin-dialog"
        className="m-auto w-full max-w-md rounded border border-shell bg-sand p-0 text-ink shadow-xl backdrop:bg-ink/60"
        onCancel={(event) => {
          event.preventDefault();
          setDismissed(true);
        }}
      >
        <form className="grid gap-4 p-6" onSubmit={(event) => void signInAgain(event)} noValidate>
          <h2 id="signin-again-title" className="text-lg font-semibold">Sign in again to carry on</h2>
          <div id="signin-again-why" className="grid gap-2 text-sm">
            <p data-testid="signin-reason">{ended?.message}</p>
            <p>Your open recording and the analysis in this tab are kept: signing in here does not reload the page.</p>
          </div>
          {problem && <p className="notice notice-warn" role="alert" data-testid="signin-again-error">{problem}</p>}
          <label className="field" htmlFor="signin-again-email">
            <span>E-mail</span>
            <input id="signin-again-email" type="email" autoComplete="username" value={email} onChange={(e) => setEmail(e.target.value)} />
          </label>
          <label className="field" htmlFor="signin-again-password">
            <span>Password</span>
            <input
              id="signin-again-password"
              ref={passwordField}
              type="password"
              autoComplete="current-password"
              value={password}
              onChange={(e) => setPassword(e.target.value)}
              aria-invalid={problem ? 'true' : undefined}
            />
          </label>
          <div className="flex flex-wrap items-center gap-3">
            <button type="submit" className="btn btn-primary" disabled={busy}>
              {busy ? 'Signing in…' : 'Sign in again'}
            </button>
            <button type="button" className="btn btn-quiet" onClick={() => setDismissed(true)}>
              Not now
            </button>
          </div>
        </form>
      </dialog>
    </>
  );
}
