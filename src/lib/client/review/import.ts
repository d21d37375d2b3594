/**
 * The study page's batch import (POST /api/studies/<id>/summary-imports): files written by `analyze … --summary`
 * go up as multipart/form-data. Each part is renamed to its position (`summary-1.json`, …) before it leaves the
 * device, so a local file name — which might echo a recording's name — never reaches the server; the answer names
 * files by those positions and `localNames` puts the real names back for the screen.
 */
export interface ImportFileReport {
  index: number;
  name: string;
  subjectCode: string | null;
  fingerprint: string | null;
  conditions: string[];
  channels: number;
  normalizedUnit: string | null;
  problems: { path: string; message: string }[];
}

export interface ImportAnswer {
  status: number;
  /** The server's sentence when it refused (nothing imported); null on success. */
  message: string | null;
  files: ImportFileReport[];
  ready: boolean;
  imported: { index: number; id: string; subjectCode: string }[];
}

export function positionalName(index: number): string {
  return `summary-${index + 1}.json`;
}

/** Puts the local names back in place of the positional ones, in reports and in the server's sentence. */
export function localNames(answer: ImportAnswer, files: readonly File[]): ImportAnswer {
  const rename = (text: string) => text.replace(/summary-(\d+)\.json/g, (m, n: string) => files[Number(n) - 1]?.name ?? m);
  return {
    ...answer,
    message: answer.message === null ? null : rename(answer.message),
    files: answer.files.map((f) => ({ ...f, name: files[f.index]?.name ?? f.name })),
  };
}

export async function sendSummaryBatch(studyId: string, files: readonly File[], intent: 'preview' | 'import'): Promise<ImportAnswer> {
  const form = new FormData();
  form.append('intent', intent);
  files.forEach((f, i) => form.append('files', f, positionalName(i)));
  const response = await fetch(`/api/studies/${encodeURIComponent(studyId)}/summary-imports`, { method: 'POST', body: form, credentials: 'same-origin', headers: { accept: 'application/json' } });
  let body: { error?: { message?: string }; files?: ImportFileReport[]; ready?: boolean; imported?: ImportAnswer['imported'] } = {};
  try {
    body = await response.json();
  } catch {
    // not JSON (a proxy's page): the status says enough
  }
  const answer: ImportAnswer = {
    status: response.status,
    message: response.ok ? null : (body.error?.message ?? `The server answered ${response.status} ${response.statusText}. Nothing was imported.`),
    files: body.files ?? [],
    ready: body.ready ?? (response.ok && intent === 'import'),
    imported: body.imported ?? [],
  };
  return localNames(answer, files);
}
