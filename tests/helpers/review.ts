// Review fixtures: a team with every role, signed-in clients, a session with a saved recipe version and summary.
import { readFileSync } from 'node:fs';
import path from 'node:path';
import { Client } from './app';

/** The demo recipe the CLI test also reads: a real recipe that the recipe schema accepts, whatever its format. */
export function demoRecipe(): Record<string, unknown> {
  return JSON.parse(readFileSync(path.resolve('public/recipes/harbour-lights.json'), 'utf8'));
}

/** A small, valid summary (src/lib/schemas/review.ts, SummaryInput). */
export function smallSummary() {
  return {
    format: 'tidemark-summary-1',
    normalizedUnit: 'decibel',
    bands: [{ label: 'theta', lowHz: 4, highHz: 8 }],
    windows: [{ label: 'early', startS: 0.1, endS: 0.5 }],
    conditions: ['lamp'],
    channels: ['Fz', 'Cz'],
    channelGroups: [{ label: 'midline', channels: ['Fz', 'Cz'] }],
    bandValues: [{ band: 'theta', window: 'early', channel: 'Fz', condition: 'lamp', raw: 12.5, normalized: 3.1 }],
    trialValues: [{ band: 'theta', window: 'early', channel: 'Fz', condition: 'lamp', values: [1, 2, null] }],
    aperiodic: [{ channel: 'Fz', condition: 'lamp', offset: 1.2, exponent: 1.5, knee: null, r2: 0.98, rmse: 0.05 }],
    maps: [{ condition: 'lamp', channelGroup: 'midline', frequenciesHz: [4, 8], timesS: [0, 0.5, 1], values: [[0, 1, 2], [null, 1, 0]] }],
  };
}


export async function signedIn(email: string, password: string): Promise<Client> {
  const client = new Client();
  const response = await client.signIn(email, password);
  if (response.status !== 303 && response.status !== 302) throw new Error(`sign-in of ${email} answered ${response.status}`);
  return client;
}
