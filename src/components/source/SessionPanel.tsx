import { useId, useState } from 'react';
import { AnalysisSessionInput } from '../../lib/schemas/studies';
import { errorMessageOf, OutboundRefusedError, send } from '../../lib/client/outbound';

interface Props {
  teamId: string;
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
export default function SessionPanel({ teamId, studyId, fingerprint, subjectCode, mayCreateSessions, role, onSubjectCode }: Props) {
  const [problem, setProblem] = useState<string | null>(null);
  // A second draft for the same subject and recording is refused (409): the refusal links the session that exists.
  const [existing, setExisting] = useState<{ id: string } | null>(null);
  const [created, setCreated] = useState<{ id: string; subjectCode: string } | null>(null);
  const [sending, setSending] = useState(false);
  const id = useId();

  const create = async () => {
    const code = subjectCode.trim();
    const invalid = checkSubjectCode(code);
    setExisting(null);
    if (invalid) return setProblem(invalid);
    setProblem(null);
    setSending(true);
    try {
      const response = await send(`/api/studies/${encodeURIComponent(studyId)}/analysis-sessions`, { json: { subjectCode: code, fingerprint } });
      if (!response.ok) {
        if (response.status === 409) {
          const body = (await response.clone().json().catch(() => null)) as { existing?: { id?: string } } | null;
          if (typeof body?.existing?.id === 'string') setExisting({ id: body.existing.id });
        }
        setProblem(await errorMessageOf(response));
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

  if (!mayCreateSessions) {
    // Not offered at all: the role cannot take this step, so there is no button to press and be refused.
    return (
      <p className="text-sm" data-testid="session-not-offered">
        Analysts start analysis sessions from here. Your role in this team ({role}) reviews them: the study page lists every session and
        links its page. This recording stays on your device either way.
      </p>
    );
  }

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
        record.
      </p>
      <div className="flex flex-wrap items-start gap-3">
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
        <button type="submit" className="btn btn-primary mt-6" disabled={sending}>
          Create analysis session
        </button>
      </div>
      {problem && (
        <p className="notice notice-warn" role="alert" data-testid="session-problem">
          {problem}
          {existing && (
            <>
              {' '}
              <a href={`/teams/${encodeURIComponent(teamId)}/studies/${encodeURIComponent(studyId)}/sessions/${encodeURIComponent(existing.id)}`} data-testid="existing-session-link">
                Open the existing session
              </a>
            </>
          )}
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
