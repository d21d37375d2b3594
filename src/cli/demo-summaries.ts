/**
 * The demo cohort's summaries, computed by the real core from the demo EDF+ files (public/recipes/harbour-lights.json
 * with each file's fingerprint; DEMO_SUMMARY_SPEC) and cached in `<dir>/summaries.json`. The cache is
 * reused while its key — this file's cache version, the recipe and every file's fingerprint in cohort.json — is the
 * same, so `npm start` and `npm test` compute it once per checkout.
 */
import { createHash } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { loadRecording } from './load-recording';
import { analyzeChannel, type ChannelAnalysis } from '../lib/analysis/analyze-channel';
import { planRun } from '../lib/analysis/run-recipe';
import { combineSummary, resolveSummarySpec, summarizeChannel, type ChannelSummary } from '../lib/analysis/summary';
import { SummaryInput } from '../lib/schemas/review';

/** Bump when what goes into a demo summary changes. */
export const DEMO_SUMMARY_CACHE_VERSION = 2;
/**
 * The builder's defaults (bands theta…gamma, windows early and late, one map over all channels), without per-trial
 * values: single trials cost most of the run and the Cohort screen pools trial averages.
 */
export const DEMO_SUMMARY_SPEC = { trialChannels: [] as string[] };

export interface DemoSubjectSummary {
  code: string;
  fingerprint: string;
  recipe: Record<string, unknown>;
  summary: Record<string, unknown>;
}

interface CacheFile {
  key: string;
  subjects: DemoSubjectSummary[];
}

/** Returns the cached summaries, or computes (and caches) them. Null when the demo files are not there. */
export async function demoSummaries(dir: string, root = process.cwd(), log: (line: string) => void = () => undefined): Promise<DemoSubjectSummary[] | null> {
  const cohortFile = path.join(dir, 'cohort.json');
  if (!fs.existsSync(cohortFile)) return null;
  const cohort = JSON.parse(fs.readFileSync(cohortFile, 'utf8')) as { subjects: { code: string; fileName: string; fingerprint: string }[] };
  const recipeText = fs.readFileSync(path.join(root, 'public', 'recipes', 'harbour-lights.json'), 'utf8');
  const key = createHash('sha256').update(JSON.stringify({ v: DEMO_SUMMARY_CACHE_VERSION, recipe: JSON.parse(recipeText), files: cohort.subjects.map((s) => [s.code, s.fingerprint]) })).digest('hex');
  const cacheFile = path.join(dir, 'summaries.json');
  if (fs.existsSync(cacheFile)) {
    const cached = JSON.parse(fs.readFileSync(cacheFile, 'utf8')) as CacheFile;
    if (cached.key === key) return cached.subjects;
  }
  const started = Date.now();
  const subjects: DemoSubjectSummary[] = [];
  for (const s of cohort.subjects) {
    const file = path.join(dir, s.fileName);
    if (!fs.existsSync(file)) return null;
    const { recording } = await loadRecording(file, { fingerprint: true });
    if (recording.fingerprint !== s.fingerprint) throw new Error(`${s.fileName}: its SHA-256 differs from cohort.json's; run npm run demo:data again`);
    const recipe = { ...JSON.parse(recipeText), recording: { fingerprint: s.fingerprint } };
    const { plan, recording: conditioned } = planRun(recording, recipe);
    const resolved = resolveSummarySpec(plan, DEMO_SUMMARY_SPEC);
    const parts: ChannelSummary[] = [];
    plan.channels.forEach((name, i) => {
      const analysis: ChannelAnalysis = analyzeChannel(plan, conditioned.data[plan.channelIndices[i]], { singleTrials: resolved.trialChannels.has(name) });
      parts.push(summarizeChannel(plan, i, analysis, resolved));
    });
    const summary = combineSummary(plan, parts, resolved);
    const checked = SummaryInput.safeParse(summary);
    if (!checked.success) throw new Error(`${s.code}: the summary does not pass SummaryInput (${checked.error.issues[0].message})`);
    subjects.push({ code: s.code, fingerprint: s.fingerprint, recipe, summary: summary as unknown as Record<string, unknown> });
  }
  fs.writeFileSync(cacheFile, JSON.stringify({ key, subjects } satisfies CacheFile));
  log(`demo summaries: computed ${subjects.length} from the demo files in ${((Date.now() - started) / 1000).toFixed(1)} s (cached in ${cacheFile})`);
  return subjects;
}
