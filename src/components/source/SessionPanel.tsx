import { useId, useState } from 'react';
import { AnalysisSessionInput } from '../../lib/schemas/studies';
import { errorMessageOf, OutboundRefusedError, send } from '../../lib/client/outbound';

interface Props {
  studyId: string;
  fingerprint: string;
  subjectCode: string;
  mayCreateSessions: boolean;
  role: string;
  onSubjectCode: (code: string) => void;
}

/** A subject code is the team's pseudonym: the shared schema's characters, and at least one digit, so a name cannot pass. */
export function checkSubjectCode(code: string): string | null {
  const parsed = AnalysisSessionInput.shape.subjectCode.safeParse(code);
  if (!parsed.success) return parsed.error.issues[0]?.message ?? 'This is not a subject code.';
  if (!/\d/.test(code)) return 'A subject code has at least one digit (for example TM-S01): a code, never a name.';
  return null;
}

/** Creates the analysis session: the one request the Source screen makes, carrying the subject code and fingerprint. */
export default function SessionPanel({ studyId, fingerprint, subjectCode, mayCreateSessions, role, onSubjectCode }: Props) {
  const [problem, setProblem] = useState<string | null>(null);
  const [created, setCreated] = useState<{ id: string; subjectCode: string } | null>(null);
  const [sending, setSending] = useState(false);
  const id = useId();

  const create = async () => {
    const code = subjectCode.trim();
    const invalid = checkSubjectCode(code);
    if (invalid) return setProblem(invalid);
    setProblem(null);
    setSending(true);
    try {
      const response = await send(`/api/studies/${encodeURIComponent(studyId)}/analysis-sessions`, { json: { subjectCode: code, fingerprint } });
      if (!response.ok) {
        const message = await errorMessageOf(response);
        setProblem(response.status === 403 ? `Not allowed: ${message} Only analysts create analysis sessions.` : message);
        return;
      }
      const body = (await response.json()) as { analysisSession: { id: string; subjectCode: string } };
      setCreated(body.analysisSession);
    } catch (error) {
      setProblem(error instanceof OutboundRefusedError ? `${error.message} Change the subject code.` : `The request failed: ${error instanceof Error ? error.message : String(error)}`);
    } finally {
      setSending(false);
    }
  };

  return (
    <form
      className="grid gap-3"
      onSubmit={(e) => {
        e.preventDefault();
        void create();
      }}
    >
      <p className="text-sm">
        Sends exactly <span className="font-mono">{'{ subjectCode, fingerprint }'}</span> to the server; see the Outbound tab for the
        record. {!mayCreateSessions && <strong>Your role ({role}) may not create analysis sessions; the server will refuse.</strong>}
      </p>
      <div className="field max-w-xs">
        <label htmlFor={`${id}-code`}>Subject code</label>
        <input
          id={`${id}-code`}
          value={subjectCode}
          autoComplete="off"
          spellCheck={false}
          onChange={(e) => onSubjectCode(e.target.value)}
          aria-invalid={problem !== null}
          aria-describedby={`${id}-code-hint`}
        />
        <p id={`${id}-code-hint`} className="text-xs text-ink-soft">
          The team's code for this subject, like TM-S01. Never a name.
        </p>
      </div>
      <button type="submit" className="btn btn-primary justify-self-start" disabled={sending}>
        Create analysis session
      </button>
      {problem && (
        <p className="notice notice-warn" role="alert" data-testid="session-problem">
          {problem}
        </p>
      )}
      {created && (
        <p className="notice" role="status" data-testid="session-created">
          Analysis session created for {created.subjectCode} (draft).
        </p>
      )}
    </form>
  );
}
