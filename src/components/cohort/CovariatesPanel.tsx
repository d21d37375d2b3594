import { useState } from 'react';
import { parseCovariatesCsv } from '../../lib/cohort/covariates-csv';

interface Props {
  studyId: string;
  subjects: string[];
  names: string[];
  bySubject: Record<string, Record<string, number>>;
  mayEdit: boolean;
  onSaved: (c: { names: string[]; bySubject: Record<string, Record<string, number>> }) => void;
}

/** Subject covariates: typed in or imported from CSV, saved to the server as one table. */
export default function CovariatesPanel({ studyId, subjects, names: savedNames, bySubject, mayEdit, onSaved }: Props) {
  const [names, setNames] = useState<string[]>(savedNames);
  const [cells, setCells] = useState<Record<string, Record<string, string>>>(() =>
    Object.fromEntries(subjects.map((s) => [s, Object.fromEntries(savedNames.map((n) => [n, bySubject[s]?.[n] === undefined ? '' : String(bySubject[s][n])]))])),
  );
  const [newName, setNewName] = useState('');
  const [message, setMessage] = useState<{ kind: 'ok' | 'warn'; text: string } | null>(null);
  const [busy, setBusy] = useState(false);

  const importCsv = async (file: File) => {
    try {
      const table = parseCovariatesCsv(await file.text(), subjects);
      const next: Record<string, Record<string, string>> = Object.fromEntries(subjects.map((s) => [s, { ...cells[s] }]));
      const allNames = [...new Set([...names, ...table.names])];
      for (const r of table.rows) table.names.forEach((n, i) => (next[r.subject][n] = r.values[i] === null ? '' : String(r.values[i])));
      setNames(allNames);
      setCells(next);
      setMessage({ kind: 'ok', text: `Read ${table.rows.length} subjects × ${table.names.length} covariates from ${file.name}. Not saved yet: press Save covariates.` });
    } catch (error) {
      setMessage({ kind: 'warn', text: `${file.name}: ${error instanceof Error ? error.message : String(error)}. Nothing was changed.` });
    }
  };

  const save = async () => {
    const rows = [];
    for (const s of subjects) {
      const values: (number | null)[] = [];
      for (const n of names) {
        const t = (cells[s]?.[n] ?? '').trim();
        if (t === '') values.push(null);
        else if (!Number.isFinite(Number(t))) {
          setMessage({ kind: 'warn', text: `Subject ${s}, covariate "${n}": "${t}" is not a number. Nothing was saved.` });
          return;
        } else values.push(Number(t));
      }
      rows.push({ subject: s, values });
    }
    setBusy(true);
    try {
      const response = await fetch(`/api/studies/${studyId}/cohort/covariates`, { method: 'PUT', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ names, rows }) });
      const body = await response.json();
      if (!response.ok) {
        const issue = body.error?.issues?.[0];
        setMessage({ kind: 'warn', text: `Not saved: ${issue ? `${issue.path}: ${issue.message}` : body.error?.message ?? response.status}` });
        return;
      }
      onSaved(body.covariates);
      setMessage({ kind: 'ok', text: `Saved ${body.saved} values.` });
    } catch {
      setMessage({ kind: 'warn', text: 'The server could not be reached; nothing was saved. Your entries are still here.' });
    } finally {
      setBusy(false);
    }
  };

  return (
    <section className="card mt-6" aria-labelledby="cov-h" data-testid="covariates-panel">
      <h2 id="cov-h" className="text-xl font-semibold">Subject covariates</h2>
      <p className="text-sm text-ink-soft">Numbers per subject (age in years, a group coded 0/1…), never names. They become columns of the tidy export and can be regressed on.</p>
      {mayEdit && (
        <div className="mt-3 flex flex-wrap items-end gap-3">
          <label className="field">
            <span className="text-sm">New covariate</span>
            <input value={newName} onChange={(e) => setNewName(e.target.value)} placeholder="age" data-testid="covariate-name" />
          </label>
          <button type="button" className="btn btn-quiet" disabled={!/^[A-Za-z][A-Za-z0-9_]*$/.test(newName) || names.includes(newName)} onClick={() => { setNames([...names, newName]); setNewName(''); }}>Add column</button>
          <label className="btn btn-quiet cursor-pointer">
            Import CSV…
            <input type="file" accept=".csv,text/csv" className="sr-only" data-testid="covariate-csv" onChange={(e) => { const f = e.target.files?.[0]; if (f) void importCsv(f); e.target.value = ''; }} />
          </label>
          <button type="button" className="btn btn-primary" disabled={busy} onClick={() => void save()} data-testid="save-covariates">Save covariates</button>
        </div>
      )}
      {message && <p className={`notice mt-3 ${message.kind === 'warn' ? 'notice-warn' : ''}`} role="status" data-testid="covariates-message">{message.text}</p>}
      {names.length === 0 ? (
        <p className="mt-3 text-sm text-ink-soft">No covariates yet.{mayEdit ? ' Add a column or import a CSV with a header such as subject,age,group.' : ''}</p>
      ) : (
        <div className="mt-3 max-h-80 overflow-auto">
          <table className="data-table" data-testid="covariates-table">
            <thead><tr><th scope="col">Subject</th>{names.map((n) => <th key={n} scope="col">{n}</th>)}</tr></thead>
            <tbody>
              {subjects.map((s) => (
                <tr key={s}>
                  <td className="font-mono">{s}</td>
                  {names.map((n) => (
                    <td key={n}>
                      {mayEdit ? (
                        <input className="w-20 border border-shell bg-foam px-1 font-mono" aria-label={`${n} of ${s}`} value={cells[s]?.[n] ?? ''} onChange={(e) => setCells({ ...cells, [s]: { ...cells[s], [n]: e.target.value } })} />
                      ) : (
                        <span className="font-mono">{cells[s]?.[n] || '—'}</span>
                      )}
                    </td>
                  ))}
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
    </section>
  );
}
