// A cohort written through the app's own routes: an analyst saves a recipe version and a summary per subject and
// submits it, a lead signs off. The numbers are an invented scenario of our own (the "Tern Point" task): a theta
// increase of about +3 dB in "gull" at Fz from 0.2 s, nothing in "reed"; raw power = 40·10^(dB/10).
import { Client } from './app';
import { createMember, createTeam } from './fixtures';
import { demoRecipe } from './review';
import { seededNormal } from './seeded-random';

export const COHORT_BANDS = [{ label: 'theta', lowHz: 4, highHz: 8 }, { label: 'alpha', lowHz: 8, highHz: 13 }];
export const COHORT_WINDOWS = [{ label: 'pre', startS: -0.4, endS: -0.1 }, { label: 'early', startS: 0.2, endS: 0.6 }, { label: 'late', startS: 0.8, endS: 1.4 }];
export const COHORT_CHANNELS = ['Fz', 'Cz', 'Pz'];
export const COHORT_CONDITIONS = ['gull', 'reed'];
const FREQS = [4, 5, 6, 7, 8, 10, 12];
const TIMES = Array.from({ length: 16 }, (_, i) => Number((-0.4 + i * 0.12).toFixed(2)));

/** One subject's summary: `effect` dB of theta in "gull" after 0.2 s at Fz (half at Cz), noise with SD 1 dB. */
export function tern(subjectIndex: number, effect = 3) {
  const z = seededNormal(1000 + subjectIndex);
  const bandValues = [];
  for (const condition of COHORT_CONDITIONS) for (const band of COHORT_BANDS) for (const window of COHORT_WINDOWS) for (const channel of COHORT_CHANNELS) {
    const planted = condition === 'gull' && band.label === 'theta' && window.startS >= 0 ? (channel === 'Fz' ? effect : channel === 'Cz' ? effect / 2 : 0) : 0;
    const db = planted + z();
    bandValues.push({ band: band.label, window: window.label, channel, condition, raw: 40 * 10 ** (db / 10), normalized: db });
  }
  const maps = COHORT_CONDITIONS.map((condition) => ({
    condition,
    channelGroup: 'frontal',
    frequenciesHz: FREQS,
    timesS: TIMES,
    values: FREQS.map((f) => TIMES.map((t) => (condition === 'gull' && f <= 8 && t >= 0.2 && t <= 1.0 ? effect : 0) + 0.8 * z())),
  }));
  return {
    format: 'tidemark-summary-1', normalizedUnit: 'decibel', bands: COHORT_BANDS, windows: COHORT_WINDOWS, conditions: COHORT_CONDITIONS,
    channels: COHORT_CHANNELS, channelGroups: [{ label: 'frontal', channels: ['Fz', 'Cz'] }], bandValues, trialValues: [], aperiodic: [], maps,
  };
}

export interface CohortFixture {
  teamId: string;
  studyId: string;
  lead: Client;
  analyst: Client;
  reviewer: Client;
  leadPerson: { email: string; password: string };
  sessions: { id: string; subject: string }[];
}

async function ok(r: Response, what: string) {
  if (r.status >= 300) throw new Error(`${what}: ${r.status} ${await r.text()}`);
  return r;
}

/**
 * `signed` subjects signed off, then `unsigned` left in review; `recipeEdit` changes the recipe of the last
 * unsigned one (to test the pooling refusal).
 */
export async function createCohort({ signed = 10, unsigned = 2, recipeEdit }: { signed?: number; unsigned?: number; recipeEdit?: (r: Record<string, any>) => void } = {}): Promise<CohortFixture> {
  const { team, study } = await createTeam();
  const leadPerson = await createMember(team.id, 'lead');
  const analystPerson = await createMember(team.id, 'analyst');
  const reviewerPerson = await createMember(team.id, 'reviewer');
  const signIn = async (p: { email: string; password: string }) => {
    const c = new Client();
    await ok(await c.signIn(p.email, p.password), 'sign-in').catch(() => undefined);
    return c;
  };
  const [lead, analyst, reviewer] = [await signIn(leadPerson), await signIn(analystPerson), await signIn(reviewerPerson)];
  const sessions: { id: string; subject: string }[] = [];
  for (let i = 0; i < signed + unsigned; i++) {
    const subject = `TP-${String(i + 1).padStart(2, '0')}`;
    const created = await (await ok(await analyst.request(`/api/studies/${study.id}/analysis-sessions`, { method: 'POST', json: { subjectCode: subject } }), 'create')).json();
    const id = created.analysisSession.id as string;
    const recipe = demoRecipe();
    if (recipeEdit && i === signed + unsigned - 1) recipeEdit(recipe);
    await ok(await analyst.request(`/api/analysis-sessions/${id}/recipe-versions`, { method: 'POST', json: { baseVersion: null, recipe } }), 'version');
    await ok(await analyst.request(`/api/analysis-sessions/${id}/recipe-versions/1/summary`, { method: 'PUT', json: tern(i) }), 'summary');
    await ok(await analyst.request(`/api/analysis-sessions/${id}/status`, { method: 'POST', json: { change: 'submit', recipeVersion: 1 } }), 'submit');
    if (i < signed) await ok(await lead.request(`/api/analysis-sessions/${id}/status`, { method: 'POST', json: { change: 'signOff', recipeVersion: 1, password: leadPerson.password } }), 'sign off');
    sessions.push({ id, subject });
  }
  return { teamId: team.id, studyId: study.id, lead, analyst, reviewer, leadPerson, sessions };
}
