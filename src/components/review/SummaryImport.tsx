import { useId, useState } from 'react';
import { useMutation } from '@tanstack/react-query';
import { sendSummaryBatch, type ImportAnswer } from '../../lib/client/review/import';
import { ReviewQueryProvider } from '../../lib/client/review/query';

interface Props {
  studyId: string;
  teamId: string;
}

/**
 * "Bring in command-line summaries": choose the files `analyze … --summary` wrote, see what each holds and what is
 * wrong with any of them, then bring in all of them or none.
 */
function SummaryImportForm({ studyId, teamId }: Props) {
  const [files, setFiles] = useState<File[]>([]);
  const [preview, setPreview] = useState<ImportAnswer | null>(null);
  const [result, setResult] = useState<ImportAnswer | null>(null);
  const inputId = useId();
  const previewing = useMutation({
    mutationFn: (chosen: File[]) => sendSummaryBatch(studyId, chosen, 'preview'),
    onSuccess: (answer) => setPreview(answer),
  });
  const importing = useMutation({
    mutationFn: () => sendSummaryBatch(studyId, files, 'import'),
    onSuccess: (answer) => {
      setResult(answer);
      if (answer.files.length > 0) setPreview(answer);
    },
  });
  const failure = previewing.error ?? importing.error;
  const badFiles = preview?.files.filter((f) => f.problems.length > 0) ?? [];

  return (
    <div className="grid gap-3" data-testid="summary-import">
      <p className="max-w-3xl text-sm text-ink-soft">
        For files written on a workstation by <code className="font-mono text-xs">npm run --silent analyze -- &lt;recording&gt; --recipe recipe.json --summary s.json --subject &lt;code&gt;</code>.
        Each file becomes a draft analysis session owned by you, with its recipe as version 1 and its summary. Files go up named by their position only; nothing
        is brought in unless every file is fine.
      </p>
      <div className="flex flex-wrap items-end gap-3">
        <label htmlFor={inputId} className="grid gap-1 text-sm font-semibold">
          Summary files (.json)
          <input
            id={inputId}
            type="file"
            multiple
            accept=".json,application/json"
            className="text-sm font-normal"
            onChange={(e) => {
              const chosen = Array.from(e.target.files ?? []);
              setFiles(chosen);
              setPreview(null);
              setResult(null);
              if (chosen.length > 0) previewing.mutate(chosen);
            }}
          />
        </label>
        <button
          type="button"
          className="btn btn-primary"
          disabled={!preview?.ready || importing.isPending || previewing.isPending || result?.status === 201}
          onClick={() => importing.mutate()}
        >
          {importing.isPending ? 'Bringing in…' : `Bring in ${files.length === 1 ? 'this file' : `all ${files.length} files`}`}
        </button>
      </div>
      {previewing.isPending && <p className="text-sm">Checking {files.length} files…</p>}
      {failure && (
        <p className="notice notice-warn" role="alert">
          The server could not be reached ({failure instanceof Error ? failure.message : String(failure)}). Nothing was imported; try again when it answers.
        </p>
      )}
      {preview && preview.status !== 200 && preview.status !== 201 && preview.files.length === 0 && (
        <p className="notice notice-warn" role="alert" data-testid="import-message">{preview.message}</p>
      )}
      {result && result.status !== 201 && (
        <p className="notice notice-warn" role="alert" data-testid="import-message">{result.message}</p>
      )}
      {result?.status === 201 && (
        <p className="notice" role="status" data-testid="import-message">
          Brought in {result.imported.length} {result.imported.length === 1 ? 'session' : 'sessions'}:{' '}
          {result.imported.map((s, i) => (
            <span key={s.id}>
              {i > 0 && ', '}
              <a className="font-mono" href={`/teams/${teamId}/studies/${studyId}/sessions/${s.id}`}>{s.subjectCode}</a>
            </span>
          ))}
          . <a href={`/teams/${teamId}/studies/${studyId}`}>Show them in the list</a>.
        </p>
      )}
      {preview && preview.files.length > 0 && (
        <>
          {preview.status === 200 && (
            <p className={preview.ready ? 'text-sm' : 'notice notice-warn'} data-testid="import-verdict">
              {preview.ready
                ? preview.files.length === 1
                  ? 'The file is fine.'
                  : `All ${preview.files.length} files are fine.`
                : `${badFiles.length} of ${preview.files.length} files ${badFiles.length === 1 ? 'has a problem' : 'have problems'}: nothing can be brought in until ${badFiles.length === 1 ? 'it is' : 'they are'} fixed or left out.`}
            </p>
          )}
          <table className="data-table" data-testid="import-preview">
            <thead>
              <tr>
                <th scope="col">File</th>
                <th scope="col">Subject</th>
                <th scope="col">Recording (SHA-256)</th>
                <th scope="col">Conditions</th>
                <th scope="col">Channels</th>
                <th scope="col">Unit</th>
                <th scope="col">Problems</th>
              </tr>
            </thead>
            <tbody>
              {preview.files.map((f) => (
                <tr key={f.index} data-file-ok={f.problems.length === 0 ? 'yes' : 'no'}>
                  <td className="font-mono text-xs">{f.name}</td>
                  <td className="font-mono">{f.subjectCode ?? '—'}</td>
                  <td className="font-mono text-2xs">{f.fingerprint ? `${f.fingerprint.slice(0, 16)}…` : '—'}</td>
                  <td>{f.conditions.join(', ') || '—'}</td>
                  <td className="font-mono">{f.channels || '—'}</td>
                  <td>{f.normalizedUnit ?? '—'}</td>
                  <td className={f.problems.length > 0 ? 'text-coral-deep' : ''}>
                    {f.problems.length === 0 ? (
                      'none'
                    ) : (
                      <ul className="grid gap-1">
                        {f.problems.map((p, i) => (
                          <li key={i}>
                            <span className="font-mono text-xs">{p.path}</span>: {p.message}
                          </li>
                        ))}
                      </ul>
                    )}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </>
      )}
    </div>
  );
}

export default function SummaryImport(props: Props) {
  return (
    <ReviewQueryProvider>
      <SummaryImportForm {...props} />
    </ReviewQueryProvider>
  );
}
