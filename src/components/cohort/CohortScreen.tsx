import { useCallback, useMemo, useState } from 'react';
import type { CohortOverview } from '../../lib/cohort/overview';
import { groupCells, tidyCsv } from '../../lib/cohort/values';
import { neutralOf, unitWord } from '../../lib/cohort/model';
import { defaultCohortDesign } from '../../lib/cohort/default-design';
import type { CohortDesignT } from '../../lib/schemas/cohort';
import { cohortResultJson, covariateMap, designResultOf, GROUP, groupMapOf, rowsAtChannel, useCohortSummaries, useMapTest, usePooledCohort } from '../../lib/client/cohort/cohort-model';
import { downloadBlob, fileSafe } from '../explorer/download';
import SessionTable from './SessionTable';
import CovariatesPanel from './CovariatesPanel';
import DesignPanel from './DesignPanel';
import DistributionCheck from './DistributionCheck';
import GroupMapSection from './GroupMapSection';
import { BandOverWindowsPlot, fmt } from './plots';

interface Props {
  study: { id: string; name: string };
  team: { id: string };
  overview: CohortOverview;
  may: { covariates: boolean; design: boolean; includeUnsigned: boolean };
}

/** The Cohort screen: who enters, covariates, group values and plots, the tests, the group map and its test, the distribution check, exports. */
export default function CohortScreen({ study, team, overview, may }: Props) {
  const [includeUnsigned, setIncludeUnsigned] = useState(false);
  const [excluded, setExcluded] = useState<ReadonlySet<string>>(new Set());
  const { summaries, loadError } = useCohortSummaries(study.id);
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

  const onToggle = useCallback((id: string, enter: boolean) => {
    setExcluded((prev) => {
      const next = new Set(prev);
      if (enter) next.delete(id);
      else next.add(id);
      return next;
    });
  }, []);

  const { entering, unsignedIn, verdict, pooled } = usePooledCohort(overview.sessions, summaries, includeUnsigned, excluded);
  const covMap = useMemo(() => covariateMap(covariates), [covariates]);

  // Rows at the chosen channel (or a group's channels averaged per subject).
  const atChannel = useMemo(() => rowsAtChannel(pooled, channel, outline), [pooled, channel, outline]);
  const cells = useMemo(() => groupCells(atChannel).filter((c) => c.condition === condition), [atChannel, condition]);

  const [design, setDesign] = useState<CohortDesignT>(() => saved?.cohort ?? defaultCohortDesign(conditions, outline?.channelGroups[0]?.label ?? null, neutral));
  const designResult = useMemo(() => designResultOf(pooled, covMap, design), [pooled, covMap, design]);

  // ---- group map and its test
  const [mapGroup, setMapGroup] = useState(outline?.channelGroups[0]?.label ?? '');
  const [mapConditions, setMapConditions] = useState<[string] | [string, string]>(design.mapTest?.conditions ?? [conditions[0] ?? '']);
  const groupMap = useMemo(() => (summaries && verdict.ok ? groupMapOf(entering, summaries, mapGroup, mapConditions, neutral, design) : null), [summaries, verdict, entering, mapGroup, mapConditions, neutral, design]);
  const mapTest = useMapTest(groupMap);

  // ---- exports
  const provenance = {
    study: study.name,
    includeUnsigned,
    unsignedSessions: unsignedIn,
    sessions: pooled.map((s) => ({ analysisSessionId: s.analysisSessionId, subject: s.subject, recipeVersion: s.recipeVersion, recipeHash: s.recipeHash, signOff: s.signOff })),
  };
  const exportCsv = () => downloadBlob(new Blob([tidyCsv(pooled, covMap)], { type: 'text/csv' }), `${fileSafe(study.name)}-values.csv`);
  const exportJson = () => {
    const json = cohortResultJson({ designResult: designResult.result, mapTest: mapTest.run.result, groupMap, mapGroup, mapConditions, provenance });
    downloadBlob(new Blob([json], { type: 'application/json' }), `${fileSafe(study.name)}-result.json`);
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

      <GroupMapSection
        groups={outline?.channelGroups.map((g) => g.label) ?? []}
        conditions={conditions}
        mapGroup={mapGroup}
        onMapGroup={setMapGroup}
        mapConditions={mapConditions}
        onMapConditions={setMapConditions}
        groupMap={groupMap}
        run={mapTest.run}
        onRun={() => void mapTest.start()}
        onCancel={mapTest.cancel}
        neutral={neutral}
        u={u}
        unsignedBanner={unsignedBanner}
      />

      <DistributionCheck atChannel={atChannel} bands={bands} windows={windows} initialWindow={tableWindow} condition={condition} channel={channel} u={u} />

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
