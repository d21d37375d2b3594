import { useEffect, useMemo, useRef, useState } from 'react';
import type { CohortOverview } from '../../cohort/overview';
import { averageChannels, toTidyValues, type Covariates, type PooledSession } from '../../cohort/values';
import { describeSide, distributionSentence, type DistributionSide } from '../../cohort/distribution';
import { buildGroupMap, type GroupMap } from '../../cohort/group-map';
import { checkPooling, enteringSessions, pooledSessions, subjectMapsOf, type StoredSummary } from '../../cohort/model';
import { runDesign, type Design, type DesignResult } from '../../statistics/design';
import type { CohortDesignT } from '../../schemas/cohort';
import { clustersOut } from '../../statistics/maps';
import type { MapTestResult } from '../../statistics/map-test';
import { runMapTestInWorker } from '../map-test-runner';

// What the Cohort screen computes besides painting: the summaries it loads, the channel or group it looks at, the
// distribution check, the map test's run, and the JSON export. The pooling and statistics are lib/cohort's and
// lib/statistics'; this module only wires them to the screen's choices.

/** Channel choices that name a group carry this prefix: `group:left central`. */
export const GROUP = 'group:';

/** Every subject's summary of the study, fetched once; a failure is said in words. */
export function useCohortSummaries(studyId: string): { summaries: Record<string, StoredSummary> | null; loadError: string | null } {
  const [summaries, setSummaries] = useState<Record<string, StoredSummary> | null>(null);
  const [loadError, setLoadError] = useState<string | null>(null);
  useEffect(() => {
    let live = true;
    fetch(`/api/studies/${studyId}/cohort/summaries`)
      .then(async (r) => {
        if (!r.ok) throw new Error(`the server answered ${r.status}`);
        return (await r.json()) as { summaries: Record<string, StoredSummary> };
      })
      .then((b) => live && setSummaries(b.summaries))
      .catch((e) => live && setLoadError(`The summaries could not be loaded (${e instanceof Error ? e.message : e}); reload the page.`));
    return () => void (live = false);
  }, [studyId]);
  return { summaries, loadError };
}

type Sessions = CohortOverview['sessions'];

/**
 * Who enters the cohort (signed-off sessions, unsigned ones when asked, minus those left out), how many of them are
 * unsigned, whether their recipes may be pooled (the field that differs when not), and their pooled values.
 */
export function usePooledCohort(sessions: Sessions, summaries: Record<string, StoredSummary> | null, includeUnsigned: boolean, excluded: ReadonlySet<string>) {
  const entering = useMemo(() => enteringSessions(sessions, includeUnsigned, excluded), [sessions, includeUnsigned, excluded]);
  const verdict = useMemo(() => checkPooling(entering), [entering]);
  const pooled = useMemo<PooledSession[]>(() => (summaries && verdict.ok ? pooledSessions(entering, summaries) : []), [summaries, verdict, entering]);
  return { entering, unsignedIn: entering.filter((s) => s.status !== 'signed off').length, verdict, pooled };
}

/** The group map of `mapGroup` over the entering subjects, with the saved design's alpha and seed; null without a group. */
export function groupMapOf(
  entering: ReturnType<typeof enteringSessions>,
  summaries: Record<string, StoredSummary>,
  mapGroup: string,
  mapConditions: [string] | [string, string],
  neutral: number,
  design: CohortDesignT,
): GroupMap | null {
  if (!mapGroup) return null;
  return buildGroupMap(subjectMapsOf(entering, summaries), mapGroup, mapConditions, neutral, { alpha: design.mapTest?.alpha ?? 0.05, seed: design.design.seed });
}

/** The study's covariates as the statistics read them: name → subject → value. */
export function covariateMap(covariates: CohortOverview['covariates']): Covariates {
  return new Map(covariates.names.map((n) => [n, new Map(Object.entries(covariates.bySubject).flatMap(([s, v]) => (v[n] === undefined ? [] : [[s, v[n]] as [string, number]])))]));
}

/** The study's saved tests run on the pooled values, or the reason they cannot run; nothing before anyone enters. */
export function designResultOf(pooled: PooledSession[], covariates: Covariates, design: CohortDesignT): { result: DesignResult | null; error: string | null } {
  if (pooled.length === 0) return { result: null, error: null };
  try {
    return { result: runDesign(toTidyValues(pooled, covariates), design.design as Design), error: null };
  } catch (e) {
    return { result: null, error: e instanceof Error ? e.message : String(e) };
  }
}

type Outline = NonNullable<CohortOverview['sessions'][number]['outline']>;

/** Each pooled session's rows at one channel, or a group's channels averaged per subject. */
export function rowsAtChannel(pooled: PooledSession[], channel: string, outline: Outline | null): PooledSession[] {
  if (!channel) return [];
  const group = channel.startsWith(GROUP) ? outline?.channelGroups.find((g) => GROUP + g.label === channel) : null;
  return pooled.map((s) => ({ ...s, rows: group ? averageChannels(s, group.channels, group.label) : s.rows.filter((r) => r.channel === channel) }));
}

/** Raw band power beside the normalized values of the same subjects, for one band, window and condition. */
export function distributionAt(atChannel: PooledSession[], band: string, window: string, condition: string, channel: string): { raw: DistributionSide; normalized: DistributionSide; sentence: string } {
  const pick = (which: 'raw' | 'normalized') =>
    atChannel.flatMap((s) => s.rows.filter((r) => r.band === band && r.window === window && r.condition === condition && r[which] !== null).map((r) => ({ subject: s.subject, value: r[which] as number })));
  const raw = describeSide(pick('raw'));
  const normalized = describeSide(pick('normalized'));
  const where = `${band} · ${window} (${condition}, ${channel.replace(GROUP, 'group ')})`;
  return { raw, normalized, sentence: raw.n === 0 ? '' : distributionSentence(where, raw, normalized) };
}

export interface MapRun {
  state: 'idle' | 'running' | 'done' | 'cancelled' | 'failed';
  progress: number;
  result: MapTestResult | null;
  message: string;
}

/** The cluster test on `groupMap` in a worker: run, cancel, progress; a new map forgets the last run. */
export function useMapTest(groupMap: GroupMap | null): { run: MapRun; start: () => Promise<void>; cancel: () => void } {
  const [run, setRun] = useState<MapRun>({ state: 'idle', progress: 0, result: null, message: '' });
  const abort = useRef<AbortController | null>(null);
  // A new map stops a test still running on the old one: its result would sit beside the new map's axes.
  useEffect(() => {
    abort.current?.abort();
    abort.current = null;
    setRun({ state: 'idle', progress: 0, result: null, message: '' });
  }, [groupMap]);
  const start = async () => {
    if (!groupMap?.testInput) return;
    abort.current?.abort();
    const controller = new AbortController();
    abort.current = controller;
    const mine = () => abort.current === controller;
    setRun({ state: 'running', progress: 0, result: null, message: '' });
    try {
      const result = await runMapTestInWorker(groupMap.testInput, { signal: controller.signal, onProgress: (f) => mine() && setRun((r) => (r.state === 'running' ? { ...r, progress: f } : r)) });
      if (mine()) setRun({ state: 'done', progress: 1, result, message: '' });
    } catch (e) {
      if (!mine()) return;
      const cancelled = e instanceof Error && e.name === 'MapTestCancelledError';
      setRun({ state: cancelled ? 'cancelled' : 'failed', progress: 0, result: null, message: cancelled ? 'Cancelled; nothing was kept.' : `The map test failed: ${e instanceof Error ? e.message : e}` });
    } finally {
      if (mine()) abort.current = null;
    }
  };
  return { run, start, cancel: () => abort.current?.abort() };
}

/** The "Test results (JSON)" export: the design's tests, the map test and its clusters when run, and who entered. */
export function cohortResultJson(input: {
  designResult: DesignResult | null;
  mapTest: MapTestResult | null;
  groupMap: GroupMap | null;
  mapGroup: string;
  mapConditions: [string] | [string, string];
  provenance: object;
}): string {
  const { designResult, mapTest: r, groupMap, mapGroup, mapConditions, provenance } = input;
  const body = {
    ...(designResult ?? { tests: [], warnings: [] }),
    ...(r && groupMap ? { clusters: clustersOut(r, { times: groupMap.timesS, frequencies: groupMap.frequenciesHz }), mapTest: { n: r.n, subjects: groupMap.testSubjects, df: r.df, alpha: r.alpha, threshold: r.threshold, permutations: r.permutations, exact: r.exact, seed: r.seed, channelGroup: mapGroup, conditions: mapConditions } } : {}),
    cohort: provenance,
  };
  return JSON.stringify(body, null, 2) + '\n';
}
