import { useEffect, useMemo, useRef, useState } from 'react';
import { useForm } from 'react-hook-form';
import { z } from '../../lib/analysis/zod';
import type { Role } from '../../lib/permissions';
import { allowedSteps, MEANING_WORDS, STEP_WORDS, whyNoSteps, type ReviewStep } from '../../lib/client/review/actions';
import { postNote, postReply, useNotes, useOutbox, useResolveNote, useReviewStep, useSessionView, useSummary, type SummaryView } from '../../lib/client/review/api';
import { ReviewQueryProvider } from '../../lib/client/review/query';
import { reviewOutbox } from '../../lib/client/review/outbox';
import type { NoteView, SessionView, SignatureView } from '../../lib/client/review/types';
import { downloadBlob, fileSafe } from '../explorer/download';

interface Props {
  sessionId: string;
  study: { id: string; name: string };
  team: { id: string; name: string };
  me: { id: string; name: string };
  role: Role;
  ownerName: string;
  initial: SessionView;
}

const when = (iso: string) => new Date(iso).toISOString().replace('T', ' ').slice(0, 19) + ' UTC';
const UNIT_WORDS: Record<string, string> = { decibel: 'dB', 'percent-change': '% change', 'z-score': 'z', 'power-ratio': '× baseline' };

/** The signature manifest: printed name, time, meaning, version, SHA-256 of what was signed. */
export function Manifest({ signatures, currentVersion }: { signatures: SignatureView[]; currentVersion: number | null }) {
  if (signatures.length === 0) return <p className="text-sm text-ink-soft">Not signed.</p>;
  return (
    <>
      <table className="data-table mt-2" data-testid="signature-manifest">
        <thead>
          <tr>
            <th scope="col">Signed by</th>
            <th scope="col">When</th>
            <th scope="col">Meaning</th>
            <th scope="col">Version</th>
            <th scope="col">Content SHA-256</th>
          </tr>
        </thead>
        <tbody>
          {signatures.map((s) => (
            <tr key={s.id} data-meaning={s.meaning}>
              <td>{s.printedName}</td>
              <td className="font-mono text-xs">{when(s.signedAt)}</td>
              <td>
                {MEANING_WORDS[s.meaning]}
                {s.reason ? `: ${s.reason}` : ''}
              </td>
              <td className="font-mono">
                {s.recipeVersion}
                {s.recipeVersion !== currentVersion ? ' (earlier version)' : ''}
              </td>
              <td className="font-mono text-2xs break-all">{s.contentHash}</td>
            </tr>
          ))}
        </tbody>
      </table>
      <p className="mt-1 text-2xs text-ink-soft">Each hash is a SHA-256 over the recipe version and its summary in RFC 8785 canonical JSON; a later version is not covered by an earlier signature.</p>
    </>
  );
}

const SignForm = z.object({
  password: z.string().min(1, 'Enter your password to sign.').max(1024),
  reason: z.string().max(2000, 'At most 2000 characters.'),
});
type SignFormT = z.infer<typeof SignForm>;

function SignDialog({ step, version, me, onClose, sessionId }: { step: ReviewStep; version: number; me: { name: string }; onClose: () => void; sessionId: string }) {
  const ref = useRef<HTMLDialogElement>(null);
  const mutation = useReviewStep(sessionId);
  const { register, handleSubmit, formState, setError } = useForm<SignFormT>({ defaultValues: { password: '', reason: '' } });
  useEffect(() => {
    ref.current?.showModal();
  }, []);
  const meaning = step === 'return' ? 'returned' : step === 'signOff' ? 'approved' : 'reviewed';
  const submit = handleSubmit(async (values) => {
    const parsed = SignForm.safeParse(values);
    if (!parsed.success) {
      for (const issue of parsed.error.issues) setError(issue.path[0] as keyof SignFormT, { message: issue.message });
      return;
    }
    if (step === 'return' && values.reason.trim() === '') return setError('reason', { message: 'Say why the session goes back.' });
    try {
      await mutation.mutateAsync({ step, recipeVersion: version, password: values.password, ...(step === 'return' ? { reason: values.reason.trim() } : {}) });
      onClose();
    } catch {
      // shown below from mutation.error
    }
  });
  return (
    <dialog ref={ref} className="card m-auto max-w-lg backdrop:bg-ink/40" aria-labelledby="sign-title" onClose={onClose} data-testid="sign-dialog">
      <form onSubmit={submit} className="grid gap-3">
        <h2 id="sign-title" className="text-lg font-semibold">
          {STEP_WORDS[step]}: recipe version {version}
        </h2>
        <p className="text-sm">
          You sign as <strong>{me.name}</strong>. The record keeps your printed name, the time, the meaning “{MEANING_WORDS[meaning]}” and a SHA-256 of exactly this recipe version and its summary.
        </p>
        {step === 'signOff' && (
          <p className="notice text-sm">Tidemark is a research tool, not a medical device: signing off approves the analysis for research use, not for diagnosis or treatment.</p>
        )}
        {step === 'return' && (
          <label className="field">
            <span>Why it goes back</span>
            <textarea rows={3} {...register('reason')} />
            {formState.errors.reason && <span className="field-error">{formState.errors.reason.message}</span>}
          </label>
        )}
        <label className="field">
          <span>Your password, again</span>
          <input type="password" autoComplete="current-password" {...register('password')} />
          {formState.errors.password && <span className="field-error">{formState.errors.password.message}</span>}
        </label>
        {mutation.error && (
          <p className="notice notice-warn" role="alert" data-testid="sign-problem">
            {mutation.error.message}
          </p>
        )}
        <div className="flex gap-2">
          <button type="submit" className="btn btn-primary" disabled={mutation.isPending}>
            {mutation.isPending ? 'Signing…' : STEP_WORDS[step]}
          </button>
          <button type="button" className="btn btn-quiet" onClick={() => ref.current?.close()}>
            Cancel
          </button>
        </div>
      </form>
    </dialog>
  );
}

function SummaryOverview({ view }: { view: SummaryView }) {
  const s = view.summary;
  const unit = UNIT_WORDS[s.normalizedUnit] ?? s.normalizedUnit;
  const mean = (xs: (number | null)[]) => {
    const ok = xs.filter((x): x is number => x !== null);
    return ok.length ? ok.reduce((a, b) => a + b, 0) / ok.length : null;
  };
  const fmt = (x: number | null) => (x === null ? '—' : x.toFixed(2));
  return (
    <div data-testid="summary-overview">
      <p className="text-sm">
        {s.channels.length} channels · conditions {s.conditions.join(', ')} · normalized as {s.normalizedUnit} · {s.trialValues.length} rows of per-trial values · maps over “{s.maps[0]?.channelGroup ?? '—'}” · SHA-256{' '}
        <span className="font-mono text-2xs">{view.summaryHash.slice(0, 16)}…</span>
      </p>
      <table className="data-table mt-2">
        <caption className="text-left text-xs text-ink-soft">Mean over channels of each band × window value ({unit})</caption>
        <thead>
          <tr>
            <th scope="col">Band</th>
            <th scope="col">Window</th>
            {s.conditions.map((c) => (
              <th scope="col" key={c}>
                {c}
              </th>
            ))}
          </tr>
        </thead>
        <tbody>
          {s.bands.flatMap((b) =>
            s.windows.map((w) => (
              <tr key={`${b.label}/${w.label}`}>
                <td>
                  {b.label} <span className="text-2xs text-ink-soft">{b.lowHz}–{b.highHz} Hz</span>
                </td>
                <td>
                  {w.label} <span className="text-2xs text-ink-soft">{w.startS}–{w.endS} s</span>
                </td>
                {s.conditions.map((c) => (
                  <td className="font-mono" key={c}>
                    {fmt(mean(s.bandValues.filter((v) => v.band === b.label && v.window === w.label && v.condition === c).map((v) => v.normalized)))}
                  </td>
                ))}
              </tr>
            )),
          )}
          <tr>
            <td colSpan={2}>aperiodic exponent (mean)</td>
            {s.conditions.map((c) => (
              <td className="font-mono" key={c}>
                {fmt(mean(s.aperiodic.filter((a) => a.condition === c).map((a) => a.exponent)))}
              </td>
            ))}
          </tr>
        </tbody>
      </table>
    </div>
  );
}

function NoteThread({ note, replies, userId, sessionId, currentVersion }: { note: NoteView; replies: NoteView[]; userId: string; sessionId: string; currentVersion: number | null }) {
  const [reply, setReply] = useState('');
  const resolve = useResolveNote(sessionId);
  const anchor = note.anchor;
  const where = [
    note.recipeVersion === null ? 'on the session' : `on version ${note.recipeVersion}${note.recipeVersion !== currentVersion ? ' (earlier version)' : ''}`,
    anchor?.channel && `channel ${anchor.channel}`,
    anchor?.channelGroup && `group ${anchor.channelGroup}`,
    anchor?.condition && `condition ${anchor.condition}`,
    anchor?.timeS && `${anchor.timeS[0]}…${anchor.timeS[1]} s`,
    anchor?.frequencyHz && `${anchor.frequencyHz[0]}…${anchor.frequencyHz[1]} Hz`,
  ].filter(Boolean);
  return (
    <li id={`note-${note.id}`} className="border-l-2 border-shell pl-3" data-testid="note" data-resolved={note.resolvedAt ? 'yes' : 'no'}>
      <p className="text-xs text-ink-soft">
        {note.authorName ?? 'someone'} · {when(note.createdAt)} · {where.join(', ')}
        {note.resolvedAt && ' · resolved'}
      </p>
      <p className="whitespace-pre-wrap">{note.body}</p>
      <ul className="mt-1 grid gap-1 pl-4">
        {replies.map((r) => (
          <li key={r.id} className="text-sm">
            <span className="text-xs text-ink-soft">
              {r.authorName ?? 'someone'} · {when(r.createdAt)}:
            </span>{' '}
            <span className="whitespace-pre-wrap">{r.body}</span>
          </li>
        ))}
      </ul>
      <form
        className="mt-1 flex flex-wrap items-center gap-2"
        onSubmit={(e) => {
          e.preventDefault();
          if (reply.trim() === '') return;
          void postReply(userId, sessionId, note.id, reply.trim());
          setReply('');
        }}
      >
        <input className="min-w-64 rounded border border-shell bg-foam px-2 py-1 text-sm" aria-label={`Reply to the note by ${note.authorName ?? 'someone'}`} value={reply} onChange={(e) => setReply(e.target.value)} placeholder="Reply" maxLength={4000} />
        <button type="submit" className="btn btn-quiet text-sm">
          Reply
        </button>
        <button type="button" className="btn btn-quiet text-sm" disabled={resolve.isPending} onClick={() => resolve.mutate({ noteId: note.id, resolved: note.resolvedAt === null })}>
          {note.resolvedAt ? 'Reopen' : 'Mark resolved'}
        </button>
        {resolve.error && <span className="text-sm text-coral-deep">{resolve.error.message}</span>}
      </form>
    </li>
  );
}

function SessionReviewBody({ sessionId, study, team, me, role, ownerName, initial }: Props) {
  const session = useSessionView(sessionId, initial);
  const view = session.data ?? initial;
  const s = view.analysisSession;
  const summary = useSummary(sessionId, s.currentVersion);
  const notes = useNotes(sessionId);
  const outbox = useOutbox(me.id, sessionId);
  const [signing, setSigning] = useState<ReviewStep | null>(null);
  const [noteBody, setNoteBody] = useState('');
  const [onVersion, setOnVersion] = useState(true);
  const submit = useReviewStep(sessionId);
  const check = { role, isOwner: s.ownerId === me.id, status: s.status, currentVersion: s.currentVersion, hasSummary: view.current?.summaryHash != null };
  const steps = allowedSteps(check);
  const threads = useMemo(() => (notes.data ?? []).filter((n) => n.parentId === null), [notes.data]);
  const waiting = outbox.filter((i) => i.state !== 'refused');
  const refused = outbox.filter((i) => i.state === 'refused');

  const exportJson = () => {
    const doc = {
      format: 'tidemark-session-export-1',
      exportedAt: new Date().toISOString(),
      caution: 'Research tool, not a medical device: not validated for diagnosis or treatment.',
      team: { id: team.id, name: team.name },
      study: { id: study.id, name: study.name },
      analysisSession: { ...s, ownerName },
      currentVersion: view.current,
      versions: view.versions,
      summary: summary.data ? { recipeVersion: summary.data.recipeVersion, summaryHash: summary.data.summaryHash, summary: summary.data.summary } : null,
      signatureManifest: view.signatures.map((g) => ({ printedName: g.printedName, signedAt: g.signedAt, meaning: g.meaning, reason: g.reason, recipeVersion: g.recipeVersion, contentSha256: g.contentHash })),
      notes: notes.data ?? [],
    };
    downloadBlob(new Blob([JSON.stringify(doc, null, 2)], { type: 'application/json' }), `session-${fileSafe(s.subjectCode)}-v${s.currentVersion ?? 0}.json`);
  };

  return (
    <div className="grid gap-6" data-testid="session-review" data-status={s.status}>
      <section className="card" aria-labelledby="status-h">
        <h2 id="status-h" className="text-lg font-semibold">
          Status: <span className="role-badge" data-testid="session-status">{s.status}</span>
          {s.currentVersion !== null && <span className="text-sm font-normal text-ink-soft"> · recipe version {s.currentVersion}</span>}
        </h2>
        {s.status === 'returned' && s.returnReason && (
          <p className="notice notice-warn mt-2" data-testid="return-reason">
            Returned: {s.returnReason}
          </p>
        )}
        <div className="mt-3 flex flex-wrap gap-2" data-testid="review-steps">
          {steps.map((step) => (
            <button
              key={step}
              type="button"
              className={step === 'signOff' || step === 'submit' ? 'btn btn-primary' : 'btn btn-quiet'}
              disabled={submit.isPending}
              onClick={() => (step === 'submit' ? submit.mutate({ step, recipeVersion: s.currentVersion! }) : setSigning(step))}
            >
              {STEP_WORDS[step]}
            </button>
          ))}
          {steps.length === 0 && whyNoSteps(check) && <p className="text-sm text-ink-soft" data-testid="no-steps">{whyNoSteps(check)}</p>}
          <a className="btn btn-quiet ml-auto" href={`/teams/${team.id}/studies/${study.id}/workspace?session=${sessionId}`} data-testid="open-in-workspace">
            Open in workspace
          </a>
          <button type="button" className="btn btn-quiet" onClick={exportJson} data-testid="export-session">
            Download this session (JSON)
          </button>
        </div>
        {submit.error && (
          <p className="notice notice-warn mt-2" role="alert">
            {submit.error.message}
          </p>
        )}
        {signing && s.currentVersion !== null && <SignDialog step={signing} version={s.currentVersion} me={me} sessionId={sessionId} onClose={() => setSigning(null)} />}
      </section>

      <section aria-labelledby="manifest-h">
        <h2 id="manifest-h" className="text-lg font-semibold">
          Signatures
        </h2>
        <Manifest signatures={view.signatures} currentVersion={s.currentVersion} />
      </section>

      <section aria-labelledby="summary-h">
        <h2 id="summary-h" className="text-lg font-semibold">
          Current summary
        </h2>
        {s.currentVersion === null ? (
          <p className="text-sm text-ink-soft">No recipe version yet.</p>
        ) : summary.isPending ? (
          <p className="text-sm">Loading…</p>
        ) : summary.data ? (
          <SummaryOverview view={summary.data} />
        ) : (
          <p className="text-sm text-ink-soft">Version {s.currentVersion} has no summary yet.</p>
        )}
        <p className="mt-2 text-2xs text-ink-soft">Derived numbers only: the recording stays on the analyst’s device. Research use; not for diagnosis or treatment.</p>
      </section>

      <section aria-labelledby="versions-h">
        <h2 id="versions-h" className="text-lg font-semibold">
          Recipe versions
        </h2>
        {view.versions.length === 0 ? (
          <p className="text-sm text-ink-soft">None saved yet.</p>
        ) : (
          <table className="data-table mt-2" data-testid="recipe-versions">
            <thead>
              <tr>
                <th scope="col">Version</th>
                <th scope="col">Saved</th>
                <th scope="col">Recipe SHA-256</th>
                <th scope="col">Summary SHA-256</th>
              </tr>
            </thead>
            <tbody>
              {[...view.versions].reverse().map((v) => (
                <tr key={v.number}>
                  <td className="font-mono">
                    {v.number}
                    {v.number === s.currentVersion ? ' (current)' : ''}
                  </td>
                  <td className="font-mono text-xs">{when(v.createdAt)}</td>
                  <td className="font-mono text-2xs">{v.recipeHash.slice(0, 16)}…</td>
                  <td className="font-mono text-2xs">{v.summaryHash ? `${v.summaryHash.slice(0, 16)}…` : '—'}</td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
      </section>

      <section aria-labelledby="notes-h">
        <h2 id="notes-h" className="text-lg font-semibold">
          Notes
        </h2>
        {waiting.length > 0 && (
          <div className="notice notice-warn mt-2" role="status" data-testid="outbox-waiting">
            <p>
              {waiting.length === 1 ? '1 item waits' : `${waiting.length} items wait`} in this browser to be sent. {waiting[0].problem ?? 'Sending…'}
            </p>
            <ul className="mt-1 list-disc pl-5 text-sm">
              {waiting.map((i) => (
                <li key={i.clientKey} data-testid="outbox-item" data-state={i.state}>
                  {i.kind === 'recipe-draft' ? 'recipe draft' : i.kind}: “{String(i.body.body ?? '').slice(0, 80)}” · {i.state === 'sending' ? 'sending' : 'waiting'}
                </li>
              ))}
            </ul>
          </div>
        )}
        {refused.length > 0 && (
          <div className="notice notice-warn mt-2" role="alert" data-testid="outbox-refused">
            {refused.map((i) => (
              <p key={i.clientKey}>
                Not sent: “{String(i.body.body ?? '').slice(0, 80)}” — {i.problem}{' '}
                <button type="button" className="underline" onClick={() => void reviewOutbox(me.id).discard(i.clientKey)}>
                  Discard it
                </button>
              </p>
            ))}
          </div>
        )}
        <form
          className="mt-3 grid max-w-2xl gap-2"
          onSubmit={(e) => {
            e.preventDefault();
            const body = noteBody.trim();
            if (body === '') return;
            void postNote(me.id, sessionId, { body, recipeVersion: onVersion ? s.currentVersion : null });
            setNoteBody('');
          }}
        >
          <label className="field">
            <span>New note</span>
            <textarea rows={3} maxLength={4000} value={noteBody} onChange={(e) => setNoteBody(e.target.value)} />
          </label>
          {s.currentVersion !== null && (
            <label className="flex items-center gap-2 text-sm">
              <input type="checkbox" checked={onVersion} onChange={(e) => setOnVersion(e.target.checked)} /> about recipe version {s.currentVersion} (otherwise the session as a whole)
            </label>
          )}
          <div>
            <button type="submit" className="btn btn-primary">
              Post note
            </button>
          </div>
        </form>
        {notes.error && <p className="notice notice-warn mt-2">{notes.error.message}</p>}
        {threads.length === 0 ? (
          <p className="mt-3 text-sm text-ink-soft">No notes yet.</p>
        ) : (
          <ul className="mt-3 grid gap-3" data-testid="note-list">
            {threads.map((t) => (
              <NoteThread key={t.id} note={t} replies={(notes.data ?? []).filter((r) => r.parentId === t.id)} userId={me.id} sessionId={sessionId} currentVersion={s.currentVersion} />
            ))}
          </ul>
        )}
      </section>
    </div>
  );
}

export default function SessionReview(props: Props) {
  return (
    <ReviewQueryProvider>
      <SessionReviewBody {...props} />
    </ReviewQueryProvider>
  );
}
