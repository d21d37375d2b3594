import { useCallback, useEffect, useMemo, useRef, useState } from 'react';
import type { CohortOverview } from '../../lib/cohort/overview';
import { averageChannels, groupCells, tidyCsv, toTidyValues, type Covariates, type PooledSession } from '../../lib/cohort/values';
import { checkPooling, enteringSessions, neutralOf, pooledSessions, subjectMapsOf, unitWord, type StoredSummary } from '../../lib/cohort/model';
import { buildGroupMap } from '../../lib/cohort/group-map';
import { describeSide, distributionSentence } from '../../lib/cohort/distribution';
import { runDesign, type Design, type DesignResult } from '../../lib/statistics/design';
import { clustersOut } from '../../lib/statistics/maps';
import type { MapTestResult } from '../../lib/statistics/map-test';
import { runMapTestInWorker } from '../../lib/client/map-test-runner';
import { defaultCohortDesign } from '../../lib/cohort/default-design';
import type { CohortDesignT } from '../../lib/schemas/cohort';
import { downloadBlob, fileSafe } from '../explorer/download';
import SessionTable from './SessionTable';
import CovariatesPanel from './CovariatesPanel';
import DesignPanel from './DesignPanel';
import { BandOverWindowsPlot, GroupMapPlot, HistogramPlot, QqPlot, fmt } from './plots';

interface Props {
  study: { id: string; name: string };
  team: { id: string };
  overview: CohortOverview;
  may: { covariates: boolean; design: boolean; includeUnsigned: boolean };
}

const GROUP = 'group:';

/** The Cohort screen: who enters, covariates, group values and plots, the tests, the group map and its test, the distribution check, exports. */
export default function CohortScreen({ study, team, overview, may }: Props) {
  const [includeUnsigned, setIncludeUnsigned] = useState(false);
  const [excluded, setExcluded] = useState<ReadonlySet<string>>(new Set());
  const [summaries, setSummaries] = useState<Record<string, StoredSummary> | null>(null);
  const [loadError, setLoadError] = useState<string | null>(null);
  const [covariates, setCovariates] = useState(overview.covariates);
  const [saved, setSaved] = useState(overview.design);

  const outline = overview.sessions.find((s) => s.outline)?.outline ?? null;
  const bands = outline?.bands.map((b) => b.label) ?? [];
  const windows = outline?.windows.map((w) => w.label) ?? [];
  const conditions = outline?.conditions ?? [];
  const channelChoices = useMemo(() => [...(outline?.channelGroups.map((g) => GROUP + g.label) ?? []), ...(outline?.channels ?? [])], [outline]);
  const unit = outline?.normalizedUnit ?? 'decibel';
  const neutral = neutralOf(unit);
  const u = unitWord(unit);

  const [tableWindow, setTableWindow] = useState(() => outline?.windows.find((w) => w.startS >= 0)?.label ?? windows[0] ?? '');
  const [condition, setCondition] = useState(conditions[0] ?? '');
  const [channel, setChannel] = useState(channelChoices[0] ?? '');

  useEffect(() => {
    let live = true;
    fetch(`/api/studies/${study.id}/cohort/summaries`)
      .then(async (r) => {
        if (!r.ok) throw new Error(`the server answered ${r.status}`);
        return (await r.json()) as { summaries: Record<string, StoredSummary> };
      })
      .then((b) => live && setSummaries(b.summaries))
      .catch((e) => live && setLoadError(`The summaries could not be loaded (${e instanceof Error ? e.message : e}); reload the page.`));
    return () => void (live = false);
  }, [study.id]);

  const onToggle = useCallback((id: string, enter: boolean) => {
    setExcluded((prev) => {
      const next = new Set(prev);
      if (enter) next.delete(id);
      else next.add(id);
      return next;
    });
  }, []);

  const entering = useMemo(() => enteringSessions(overview.sessions, includeUnsigned, excluded), [overview.sessions, includeUnsigned, excluded]);
  const unsignedIn = entering.filter((s) => s.status !== 'signed off').length;
  const verdict = useMemo(() => checkPooling(entering), [entering]);
  const pooled = useMemo<PooledSession[]>(() => (summaries && verdict.ok ? pooledSessions(entering, summaries) : []), [summaries, verdict, entering]);
  const covMap = useMemo<Covariates>(() => new Map(covariates.names.map((n) => [n, new Map(Object.entries(covariates.bySubject).flatMap(([s, v]) => (v[n] === undefined ? [] : [[s, v[n]] as [string, number]])))])), [covariates]);

  // Rows at the chosen channel (or a group's channels averaged per subject).
  const atChannel = useMemo(() => {
    if (!channel) return [];
    const group = channel.startsWith(GROUP) ? outline?.channelGroups.find((g) => GROUP + g.label === channel) : null;
    return pooled.map((s) => ({ ...s, rows: group ? averageChannels(s, group.channels, group.label) : s.rows.filter((r) => r.channel === channel) }));
  }, [pooled, channel, outline]);
  const cells = useMemo(() => groupCells(atChannel).filter((c) => c.condition === condition), [atChannel, condition]);

  const [design, setDesign] = useState<CohortDesignT>(() => saved?.cohort ?? defaultCohortDesign(conditions, outline?.channelGroups[0]?.label ?? null, neutral));
  const designResult = useMemo<{ result: DesignResult | null; error: string | null }>(() => {
    if (pooled.length === 0) return { result: null, error: null };
    try {
      return { result: runDesign(toTidyValues(pooled, covMap), design.design as Design), error: null };
    } catch (e) {
      return { result: null, error: e instanceof Error ? e.message : String(e) };
    }
  }, [pooled, covMap, design]);

  // ---- group map and its test
  const [mapGroup, setMapGroup] = useState(outline?.channelGroups[0]?.label ?? '');
  const [mapConditions, setMapConditions] = useState<[string] | [string, string]>(design.mapTest?.conditions ?? [conditions[0] ?? '']);
  const groupMap = useMemo(() => (summaries && verdict.ok && mapGroup ? buildGroupMap(subjectMapsOf(entering, summaries), mapGroup, mapConditions, neutral, { alpha: design.mapTest?.alpha ?? 0.05, seed: design.design.seed }) : null), [summaries, verdict, entering, mapGroup, mapConditions, neutral, design]);
  const [mapRun, setMapRun] = useState<{ state: 'idle' | 'running' | 'done' | 'cancelled' | 'failed'; progress: number; result: MapTestResult | null; message: string }>({ state: 'idle', progress: 0, result: null, message: '' });
  const abort = useRef<AbortController | null>(null);
  useEffect(() => setMapRun({ state: 'idle', progress: 0, result: null, message: '' }), [groupMap]);
  const runTest = async () => {
    if (!groupMap?.testInput) return;
    const controller = new AbortController();
    abort.current = controller;
    setMapRun({ state: 'running', progress: 0, result: null, message: '' });
    try {
      const result = await runMapTestInWorker(groupMap.testInput, { signal: controller.signal, onProgress: (f) => setMapRun((r) => (r.state === 'running' ? { ...r, progress: f } : r)) });
      setMapRun({ state: 'done', progress: 1, result, message: '' });
    } catch (e) {
      const cancelled = e instanceof Error && e.name === 'MapTestCancelledError';
      setMapRun({ state: cancelled ? 'cancelled' : 'failed', progress: 0, result: null, message: cancelled ? 'Cancelled; nothing was kept.' : `The map test failed: ${e instanceof Error ? e.message : e}` });
    } finally {
      abort.current = null;
    }
  };

  // ---- distribution check
  const [distBand, setDistBand] = useState(bands[0] ?? '');
  const [distWindow, setDistWindow] = useState(tableWindow);
  const dist = useMemo(() => {
    const pick = (which: 'raw' | 'normalized') =>
      atChannel.flatMap((s) => s.rows.filter((r) => r.band === distBand && r.window === distWindow && r.condition === condition && r[which] !== null).map((r) => ({ subject: s.subject, value: r[which] as number })));
    const raw = describeSide(pick('raw'));
    const normalized = describeSide(pick('normalized'));
    const where = `${distBand} · ${distWindow} (${condition}, ${channel.replace(GROUP, 'group ')})`;
    return { raw, normalized, sentence: raw.n === 0 ? '' : distributionSentence(where, raw, normalized) };
  }, [atChannel, distBand, distWindow, condition, channel]);

  // ---- exports
  const provenance = {
    study: study.name,
    includeUnsigned,
    unsignedSessions: unsignedIn,
    sessions: pooled.map((s) => ({ analysisSessionId: s.analysisSessionId, subject: s.subject, recipeVersion: s.recipeVersion, recipeHash: s.recipeHash, signOff: s.signOff })),
  };
  const exportCsv = () => downloadBlob(new Blob([tidyCsv(pooled, covMap)], { type: 'text/csv' }), `${fileSafe(study.name)}-values.csv`);
  const exportJson = () => {
    const r = mapRun.result;
    const body = {
      ...(designResult.result ?? { tests: [], warnings: [] }),
      ...(r && groupMap ? { clusters: clustersOut(r, { times: groupMap.timesS, frequencies: groupMap.frequenciesHz }), mapTest: { n: r.n, subjects: groupMap.testSubjects, df: r.df, alpha: r.alpha, threshold: r.threshold, permutations: r.permutations, exact: r.exact, seed: r.seed, channelGroup: mapGroup, conditions: mapConditions } } : {}),
      cohort: provenance,
    };
    downloadBlob(new Blob([JSON.stringify(body, null, 2) + '\n'], { type: 'application/json' }), `${fileSafe(study.name)}-result.json`);
  };
  const reportHref = `/teams/${team.id}/studies/${study.id}/cohort/report?${new URLSearchParams({ ...(includeUnsigned ? { unsigned: '1' } : {}), ...(excluded.size ? { without: [...excluded].join(',') } : {}), channel, condition })}`;

  const unsignedBanner = unsignedIn > 0 && (
    <p className="notice notice-warn mt-2 text-sm" data-testid="unsigned-marker">Includes {unsignedIn} unsigned session{unsignedIn > 1 ? 's' : ''}: these results are not the signed-off cohort.</p>
  );

  if (overview.sessions.length === 0) {
    return <p className="mt-6 text-ink-soft">No analysis sessions in this study yet. Sessions appear here once analysts save recipe versions with summaries.</p>;
  }

  return (
    <div className="cohort-screen" data-testid="cohort-screen" data-ready={summaries ? 'yes' : 'no'}>
      <section className="card mt-6" aria-labelledby="who-h">
        <h2 id="who-h" className="text-xl font-semibold">Who enters</h2>
        <p className="text-sm text-ink-soft">Signed-off sessions enter by default; untick any to leave it out.</p>
        <div className="mt-3 flex flex-wrap items-end gap-4">
          <label className="inline-flex items-center gap-2 text-sm" title={may.includeUnsigned ? '' : 'Only a lead may include unsigned sessions'}>
            <input type="checkbox" checked={includeUnsigned} disabled={!may.includeUnsigned} onChange={(e) => setIncludeUnsigned(e.target.checked)} data-testid="include-unsigned" />
            Include unsigned sessions
          </label>
          <label className="field"><span className="text-sm">Window</span>
            <select value={tableWindow} onChange={(e) => setTableWindow(e.target.value)}>{windows.map((w) => <option key={w}>{w}</option>)}</select>
          </label>
          <label className="field"><span className="text-sm">Condition</span>
            <select value={condition} onChange={(e) => setCondition(e.target.value)} data-testid="condition-choice">{conditions.map((c) => <option key={c}>{c}</option>)}</select>
          </label>
          <p className="text-sm" data-testid="entering-count"><strong>{entering.length}</strong> of {overview.sessions.length} sessions enter{unsignedIn > 0 ? ` (${unsignedIn} unsigned)` : ''}.</p>
        </div>
        <div className="mt-3">
          <SessionTable sessions={overview.sessions} bands={bands} unit={u} window={tableWindow} condition={condition} covariateNames={covariates.names} covariates={covariates.bySubject} includeUnsigned={includeUnsigned} excluded={excluded} onToggle={onToggle} />
        </div>
        {!verdict.ok && <p className="notice notice-warn mt-3" role="alert" data-testid="pooling-refused" data-field={verdict.field}>{verdict.message}</p>}
        {loadError && <p className="notice notice-warn mt-3" role="alert">{loadError}</p>}
      </section>

      <CovariatesPanel studyId={study.id} subjects={overview.subjects} names={covariates.names} bySubject={covariates.bySubject} mayEdit={may.covariates} onSaved={setCovariates} />

      <section className="card mt-6" aria-labelledby="group-h" data-testid="group-values">
        <h2 id="group-h" className="text-xl font-semibold">Group values</h2>
        {unsignedBanner}
        <div className="mt-2 flex flex-wrap gap-4">
          <label className="field"><span className="text-sm">Channel</span>
            <select value={channel} onChange={(e) => setChannel(e.target.value)} data-testid="channel-choice">{channelChoices.map((c) => <option key={c} value={c}>{c.startsWith(GROUP) ? `${c.slice(GROUP.length)} (group mean)` : c}</option>)}</select>
          </label>
        </div>
        {!summaries ? <p className="mt-3 text-sm text-ink-soft">Loading the summaries…</p> : pooled.length === 0 ? (
          <p className="mt-3 text-sm text-ink-soft">{verdict.ok ? 'No session enters yet.' : 'Nothing is pooled until the recipes agree (see above).'}</p>
        ) : (
          <>
            <div className="mt-3 flex flex-wrap gap-4" data-testid="band-plots">
              {bands.map((band) => (
                <BandOverWindowsPlot key={band} band={band} neutral={neutral} unit={u} points={windows.flatMap((w) => { const c = cells.find((x) => x.band === band && x.window === w); return c ? [{ window: w, mean: c.mean, ci95: c.ci95, n: c.n, dots: c.values }] : []; })} />
              ))}
            </div>
            <table className="data-table mt-4" data-testid="group-table">
              <thead><tr><th scope="col">Band</th><th scope="col">Window</th><th scope="col">n</th><th scope="col">Mean ({u})</th><th scope="col">SD</th><th scope="col">SE</th><th scope="col">95 % CI</th></tr></thead>
              <tbody>
                {cells.map((c) => (
                  <tr key={`${c.band}/${c.window}`} data-band={c.band} data-window={c.window}>
                    <td>{c.band}</td><td>{c.window}</td><td className="font-mono">{c.n}</td><td className="font-mono">{fmt(c.mean)}</td><td className="font-mono">{fmt(c.sd)}</td><td className="font-mono">{fmt(c.se)}</td>
                    <td className="font-mono">{c.ci95 ? `${fmt(c.ci95[0])} … ${fmt(c.ci95[1])}` : '—'}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          </>
        )}
      </section>

      <DesignPanel studyId={study.id} design={design} saved={saved} conditions={conditions} covariateNames={covariates.names} channel={channel.startsWith(GROUP) ? null : channel} mayEdit={may.design} result={designResult.result} error={designResult.error} unsignedBanner={unsignedBanner} onChange={setDesign} onSaved={setSaved} />

      <section className="card mt-6" aria-labelledby="map-h" data-testid="group-map">
        <h2 id="map-h" className="text-xl font-semibold">Group map and cluster test</h2>
        {unsignedBanner}
        <p className="text-sm text-ink-soft">The mean of the subjects' reduced maps; the cluster-based permutation test (Maris &amp; Oostenveld, 2007) outlines the clusters with p &lt; 0.05; the table lists every cluster.</p>
        <div className="mt-2 flex flex-wrap items-end gap-4">
          <label className="field"><span className="text-sm">Channel group</span>
            <select value={mapGroup} onChange={(e) => setMapGroup(e.target.value)}>{outline?.channelGroups.map((g) => <option key={g.label}>{g.label}</option>)}</select>
          </label>
          <label className="field"><span className="text-sm">Condition</span>
            <select value={mapConditions[0]} onChange={(e) => setMapConditions(mapConditions.length === 2 ? [e.target.value, mapConditions[1]] : [e.target.value])}>{conditions.map((c) => <option key={c}>{c}</option>)}</select>
          </label>
          <label className="field"><span className="text-sm">Against</span>
            <select value={mapConditions[1] ?? ''} onChange={(e) => setMapConditions(e.target.value ? [mapConditions[0], e.target.value] : [mapConditions[0]])} data-testid="map-against">
              <option value="">no change ({fmt(neutral, 0)} {u})</option>
              {conditions.filter((c) => c !== mapConditions[0]).map((c) => <option key={c} value={c}>{c}</option>)}
            </select>
          </label>
          {mapRun.state === 'running' ? (
            <button type="button" className="btn btn-quiet" onClick={() => abort.current?.abort()} data-testid="cancel-map-test">Cancel</button>
          ) : (
            <button type="button" className="btn btn-primary" disabled={!groupMap?.testInput} onClick={() => void runTest()} data-testid="run-map-test">Run the cluster test</button>
          )}
        </div>
        {mapRun.state === 'running' && <progress className="mt-2 w-full" max={1} value={mapRun.progress} data-testid="map-test-progress" aria-label="Cluster test progress" />}
        {mapRun.message && <p className="notice mt-2" role="status">{mapRun.message}</p>}
        {groupMap && (
          <>
            <GroupMapPlot
              title={`${mapGroup}: ${mapConditions.length === 2 ? `${mapConditions[0]} − ${mapConditions[1]}` : mapConditions[0]} (n = ${groupMap.subjects.length})`}
              frequenciesHz={groupMap.frequenciesHz}
              timesS={groupMap.timesS}
              values={groupMap.mean}
              neutral={mapConditions.length === 2 ? 0 : neutral}
              unit={u}
              labels={mapRun.result?.labels ?? null}
              clusters={mapRun.result?.clusters ?? []}
              width={760}
              height={340}
            />
            {groupMap.warnings.map((w) => <p key={w} className="text-2xs text-ink-soft">{w}</p>)}
          </>
        )}
        {mapRun.result && (
          <table className="data-table mt-3" data-testid="cluster-table">
            <thead><tr><th scope="col">Sign</th><th scope="col">Mass (Σt)</th><th scope="col">Cells</th><th scope="col">Time (s)</th><th scope="col">Frequency (Hz)</th><th scope="col">p</th></tr></thead>
            <tbody>
              {clustersOut(mapRun.result, { times: groupMap!.timesS, frequencies: groupMap!.frequenciesHz }).slice(0, 12).map((c, i) => (
                <tr key={i}><td>{c.sign > 0 ? 'positive' : 'negative'}</td><td className="font-mono">{fmt(c.mass, 1)}</td><td className="font-mono">{c.size}</td><td className="font-mono">{fmt(c.times[0])} … {fmt(c.times[1])}</td><td className="font-mono">{fmt(c.frequencies[0], 1)} … {fmt(c.frequencies[1], 1)}</td><td className="font-mono">{c.p < 0.001 ? c.p.toExponential(2) : c.p.toFixed(4)}</td></tr>
              ))}
            </tbody>
          </table>
        )}
        {mapRun.result && <p className="mt-1 text-2xs text-ink-soft" data-testid="map-test-summary">{mapRun.result.exact ? `All ${mapRun.result.permutations} sign flips (exact)` : `${mapRun.result.permutations} random sign flips, seed ${mapRun.result.seed}`}; cluster threshold |t| &gt; {fmt(mapRun.result.threshold, 3)} (df {mapRun.result.df}).</p>}
      </section>

      <section className="card mt-6" aria-labelledby="dist-h" data-testid="distribution-check">
        <h2 id="dist-h" className="text-xl font-semibold">Distribution check</h2>
        <p className="text-sm text-ink-soft">Raw band power beside the normalized values of the same subjects. The t-tests above assume the normalized values are close to normal.</p>
        <div className="mt-2 flex flex-wrap gap-4">
          <label className="field"><span className="text-sm">Band</span><select value={distBand} onChange={(e) => setDistBand(e.target.value)}>{bands.map((b) => <option key={b}>{b}</option>)}</select></label>
          <label className="field"><span className="text-sm">Window</span><select value={distWindow} onChange={(e) => setDistWindow(e.target.value)}>{windows.map((w) => <option key={w}>{w}</option>)}</select></label>
          <p className="self-end text-sm text-ink-soft">Condition and channel as chosen above ({condition}, {channel.replace(GROUP, 'group ')}).</p>
        </div>
        {dist.raw.n > 0 && (
          <>
            <p className="mt-3 max-w-4xl" data-testid="distribution-sentence">{dist.sentence}</p>
            <div className="mt-3 grid gap-4 md:grid-cols-2">
              {([['Raw power', dist.raw, 'raw', '#8a6d3b'], [`Normalized (${u})`, dist.normalized, u, '#2f6f5e']] as const).map(([title, side, unitLabel, colour]) => (
                <div key={title} data-testid={`dist-${unitLabel === 'raw' ? 'raw' : 'normalized'}`}>
                  <h3 className="font-semibold">{title}</h3>
                  <p className="font-mono text-xs">n {side.n} · skewness {fmt(side.skewness)} · {side.normality ? `K² ${fmt(side.normality.k2)}, p ${side.normality.p < 0.001 ? side.normality.p.toExponential(1) : side.normality.p.toFixed(3)}` : 'K² needs 8 subjects'}</p>
                  <div className="flex flex-wrap gap-2">
                    <HistogramPlot title="Histogram" bins={side.histogram} unit={unitLabel === 'raw' ? 'raw power' : unitLabel} colour={colour} />
                    <QqPlot title="Normal Q–Q" points={side.qq} mean={side.mean} sd={side.sd} unit={unitLabel === 'raw' ? 'raw power' : unitLabel} colour={colour} />
                  </div>
                </div>
              ))}
            </div>
          </>
        )}
      </section>

      <section className="card mt-6" aria-labelledby="exp-h">
        <h2 id="exp-h" className="text-xl font-semibold">Take it away</h2>
        <p className="text-sm text-ink-soft">The values table reads in R or Python as is and with <code>npm run stats</code>; each row says which recipe made it and whether it was signed off.</p>
        <div className="mt-3 flex flex-wrap gap-3">
          <button type="button" className="btn btn-quiet" disabled={pooled.length === 0} onClick={exportCsv} data-testid="export-csv">Values table (CSV)</button>
          <button type="button" className="btn btn-quiet" disabled={pooled.length === 0} onClick={exportJson} data-testid="export-json">Test results (JSON)</button>
          <a className="btn btn-quiet no-underline" href={reportHref} data-testid="report-link">Printable report</a>
        </div>
      </section>
    </div>
  );
}
