import { useState, type ReactNode } from 'react';
import type { CohortOverview } from '../../lib/cohort/overview';
import type { CohortDesignT } from '../../lib/schemas/cohort';
import type { DesignResult } from '../../lib/statistics/design';
import { fmt } from './plots';

interface Props {
  studyId: string;
  design: CohortDesignT;
  saved: CohortOverview['design'];
  conditions: string[];
  covariateNames: string[];
  /** Show the cells of this channel (null: a group mean is chosen above; the tests run per channel). */
  channel: string | null;
  mayEdit: boolean;
  result: DesignResult | null;
  error: string | null;
  unsignedBanner: ReactNode;
  onChange: (d: CohortDesignT) => void;
  onSaved: (d: CohortOverview['design']) => void;
}

type Test = CohortDesignT['design']['tests'][number];
const describe = (t: Test) =>
  t.kind === 'one-sample' ? `${t.condition} against no change` : t.kind === 'paired' ? `${t.conditions[0]} − ${t.conditions[1]}, paired` : t.kind === 'regression' ? `${t.condition} on ${t.covariate}` : `repeated-measures ANOVA over ${t.factors.join(' × ')}`;
const fp = (p: number | null) => (p === null ? '—' : p < 0.001 ? p.toExponential(2) : p.toFixed(4));

/** The tests the study runs (saved with the study by a lead), their assumptions, and their results per cell. */
export default function DesignPanel({ studyId, design, saved, conditions, covariateNames, channel, mayEdit, result, error, unsignedBanner, onChange, onSaved }: Props) {
  const [kind, setKind] = useState<'one-sample' | 'paired' | 'regression'>('paired');
  const [a, setA] = useState(conditions[0] ?? '');
  const [b, setB] = useState(conditions[1] ?? conditions[0] ?? '');
  const [covariate, setCovariate] = useState(covariateNames[0] ?? '');
  const [message, setMessage] = useState<{ kind: 'ok' | 'warn'; text: string } | null>(null);
  const tests = design.design.tests;

  const add = () => {
    const t: Test = kind === 'one-sample' ? { name: `${a} vs no change`, kind, condition: a } : kind === 'paired' ? { name: `${a} − ${b}`, kind, conditions: [a, b] } : { name: `${a} on ${covariate}`, kind, condition: a, covariate };
    if (tests.some((x) => x.name === t.name)) return setMessage({ kind: 'warn', text: `A test named "${t.name}" is already in the design.` });
    if (kind === 'paired' && a === b) return setMessage({ kind: 'warn', text: 'A contrast needs two different conditions.' });
    onChange({ ...design, design: { ...design.design, tests: [...tests, t] } });
    setMessage(null);
  };
  const save = async () => {
    const response = await fetch(`/api/studies/${studyId}/cohort/design`, { method: 'PUT', headers: { 'content-type': 'application/json' }, body: JSON.stringify({ revision: saved?.revision ?? null, cohort: design }) }).catch(() => null);
    if (!response) return setMessage({ kind: 'warn', text: 'The server could not be reached; the design was not saved. It is still here.' });
    const body = await response.json();
    if (response.status === 409) return setMessage({ kind: 'warn', text: body.error.message });
    if (!response.ok) return setMessage({ kind: 'warn', text: `Not saved: ${body.error?.issues?.[0] ? `${body.error.issues[0].path}: ${body.error.issues[0].message}` : body.error?.message}` });
    onSaved(body.design);
    setMessage({ kind: 'ok', text: `Saved with the study (revision ${body.design.revision}).` });
  };

  return (
    <section className="card mt-6" aria-labelledby="tests-h" data-testid="design-panel">
      <h2 id="tests-h" className="text-xl font-semibold">Tests</h2>
      {unsignedBanner}
      <p className="text-sm text-ink-soft">
        {saved ? `Saved with the study (revision ${saved.revision}).` : 'Not saved yet: these are the default tests.'} Each test runs on every band × window × channel; Benjamini–Hochberg at q = {design.design.fdr} within each test.
        Assumptions: subjects are independent; a one-sample or paired t-test assumes the values (or differences) are close to normal — see the distribution check; a regression assumes a straight-line relation with even scatter.
      </p>
      <ul className="mt-2 grid gap-1" data-testid="design-tests">
        {tests.map((t, i) => (
          <li key={t.name} className="flex items-center gap-2 text-sm">
            <span className="font-semibold">{t.name}</span><span className="text-ink-soft">— {describe(t)}</span>
            {mayEdit && <button type="button" className="btn btn-quiet px-2 py-0 text-xs" onClick={() => onChange({ ...design, design: { ...design.design, tests: tests.filter((_, j) => j !== i) } })} aria-label={`Remove test ${t.name}`}>remove</button>}
          </li>
        ))}
      </ul>
      {mayEdit && (
        <div className="mt-3 flex flex-wrap items-end gap-3">
          <label className="field"><span className="text-sm">Kind</span>
            <select value={kind} onChange={(e) => setKind(e.target.value as typeof kind)} data-testid="test-kind">
              <option value="one-sample">condition against no change</option>
              <option value="paired">contrast of two conditions</option>
              <option value="regression">regression on a covariate</option>
            </select>
          </label>
          <label className="field"><span className="text-sm">Condition</span><select value={a} onChange={(e) => setA(e.target.value)}>{conditions.map((c) => <option key={c}>{c}</option>)}</select></label>
          {kind === 'paired' && <label className="field"><span className="text-sm">minus</span><select value={b} onChange={(e) => setB(e.target.value)}>{conditions.map((c) => <option key={c}>{c}</option>)}</select></label>}
          {kind === 'regression' && <label className="field"><span className="text-sm">Covariate</span><select value={covariate} onChange={(e) => setCovariate(e.target.value)}>{covariateNames.map((c) => <option key={c}>{c}</option>)}</select></label>}
          <button type="button" className="btn btn-quiet" onClick={add} disabled={kind === 'regression' && !covariate}>Add test</button>
          <button type="button" className="btn btn-primary" onClick={() => void save()} data-testid="save-design">Save the design with the study</button>
        </div>
      )}
      {message && <p className={`notice mt-2 ${message.kind === 'warn' ? 'notice-warn' : ''}`} role="status" data-testid="design-message">{message.text}</p>}
      {error && <p className="notice notice-warn mt-2" role="alert">{error}</p>}
      {result && (
        <div className="mt-3 grid gap-4">
          {result.tests.map((t) => {
            if (t.kind === 'repeated-anova') {
              return (
                <div key={t.name}><h3 className="font-semibold">{t.name} (n = {t.n})</h3>
                  <table className="data-table"><thead><tr><th>Effect</th><th>F</th><th>df</th><th>p</th><th>ε</th><th>p (GG)</th><th>η²p</th></tr></thead>
                    <tbody>{t.effects.map((e) => <tr key={e.effect}><td>{e.effect}</td><td className="font-mono">{fmt(e.F)}</td><td className="font-mono">{e.df1}, {e.df2}</td><td className="font-mono">{fp(e.p)}</td><td className="font-mono">{fmt(e.epsilon)}</td><td className="font-mono">{fp(e.pGG)}</td><td className="font-mono">{fmt(e.eta2p)}</td></tr>)}</tbody></table>
                </div>
              );
            }
            const all = t.cells as (typeof t.cells[number] & Record<string, unknown>)[];
            const shown = channel ? all.filter((c) => c.channel === channel) : all.filter((c) => c.discovery);
            const discoveries = all.filter((c) => c.discovery).length;
            return (
              <div key={t.name} data-testid="test-result" data-test={t.name}>
                <h3 className="font-semibold">{t.name}</h3>
                <p className="text-xs text-ink-soft">{discoveries} of {all.length} cells are discoveries (q ≤ {result ? design.design.fdr : ''}). {channel ? `Cells of ${channel}:` : 'Discoveries:'}</p>
                {/* Scrolls on its own, so it takes keyboard focus (arrow keys scroll it). */}
                <div className="max-h-72 overflow-auto" tabIndex={0} role="region" aria-label={`${t.name}: ${channel ? `cells of ${channel}` : 'discoveries'}`}>
                  <table className="data-table">
                    <thead><tr><th>Band</th><th>Window</th><th>Channel</th><th>n</th>{t.kind === 'regression' ? <><th>slope</th><th>r</th></> : <><th>mean</th><th>95 % CI</th><th>d_z</th></>}<th>t</th><th>p</th><th>q</th></tr></thead>
                    <tbody>
                      {shown.map((c) => (
                        <tr key={`${c.band}/${c.window}/${c.channel}`} className={c.discovery ? 'font-semibold' : ''}>
                          <td>{c.band}</td><td>{c.window}</td><td>{c.channel}</td><td className="font-mono">{c.n}</td>
                          {t.kind === 'regression' ? <><td className="font-mono">{fmt(c.slope as number | null, 3)}</td><td className="font-mono">{fmt(c.r as number | null)}</td></> : <><td className="font-mono">{fmt(c.mean as number | null)}</td><td className="font-mono">{c.ci95 ? `${fmt((c.ci95 as number[])[0])} … ${fmt((c.ci95 as number[])[1])}` : '—'}</td><td className="font-mono">{fmt(c.dz as number | null)}</td></>}
                          <td className="font-mono">{fmt(c.t)}</td><td className="font-mono">{fp(c.p)}</td><td className="font-mono">{fp(c.q)}</td>
                        </tr>
                      ))}
                    </tbody>
                  </table>
                </div>
              </div>
            );
          })}
          {result.warnings.length > 0 && <details className="text-xs text-ink-soft"><summary>{result.warnings.length} warnings</summary><ul>{result.warnings.slice(0, 50).map((w) => <li key={w}>{w}</li>)}</ul></details>}
        </div>
      )}
    </section>
  );
}
