import { useId, useState } from 'react';
import { AnalysisSessionInput } from '../../lib/schemas/studies';
import { linkAnalysisSession, startAnalysisSession, useReviewLink } from '../../lib/client/workspace/review';

interface Props {
  teamId: string;
  studyId: string;
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

/**
 * Starts the analysis session (the one request the Source screen makes, carrying the subject code and fingerprint)
 * through the workspace controller, which links it: the bar above the tabs then saves versions and the maps take
 * notes. A second session for the same subject and recording is refused in the server's words, with a way to
 * continue the one that exists.
 */
export default function SessionPanel({ teamId, studyId, subjectCode, mayCreateSessions, role, onSubjectCode }: Props) {
  const [problem, setProblem] = useState<{ message: string; existingId: string | null } | null>(null);
  const [sending, setSending] = useState(false);
  const linked = useReviewLink((s) => s.session);
  const id = useId();

  const create = async () => {
    const code = subjectCode.trim();
    const invalid = checkSubjectCode(code);
    if (invalid) return setProblem({ message: invalid, existingId: null });
    setProblem(null);
    setSending(true);
    try {
      const outcome = await startAnalysisSession(studyId, code);
      if (!outcome.ok) setProblem({ message: outcome.message, existingId: outcome.existingId });
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
        <div className="notice notice-warn grid gap-2" role="alert" data-testid="session-problem">
          <p>{problem.message}</p>
          {problem.existingId !== null && (
            <p className="flex flex-wrap items-center gap-3">
              {problem.existingId !== linked?.id && (
                <button type="button" className="btn btn-quiet text-sm" onClick={() => void linkAnalysisSession(problem.existingId!).then(() => setProblem(null))}>
                  Continue that session here
                </button>
              )}
              <a href={`/teams/${encodeURIComponent(teamId)}/studies/${encodeURIComponent(studyId)}/sessions/${encodeURIComponent(problem.existingId)}`} data-testid="existing-session-link">
                Open the existing session
              </a>
            </p>
          )}
        </div>
      )}
      {linked && (
        <p className="notice" role="status" data-testid="session-created">
          Analysis session for {linked.subjectCode} ({linked.status}) is open in this workspace: save versions from the bar above the tabs.
        </p>
      )}
    </form>
  );
}
