// Batch import of command-line summaries (`analyze … --summary`): multipart/form-data with `intent` ("preview" or
// "import") and one `files` part per file. Every file is checked with the same schemas and caps as a browser upload
// (CliSummaryFile: subject code, fingerprint, format-2 recipe, SummaryInput). A preview answers what each file holds
// and its problems; an import writes every file or none, in one transaction. Problems name the file and the field.
import type { APIRoute } from 'astro';
import { HttpError, json, notFound, nulPath, requirePermission, requireUser, route } from '../../../../lib/server/http';
import { getStudyForMember } from '../../../../db/queries/teams';
import { db } from '../../../../db/client';
import { importSummaries, sessionFor, duplicateSessionWords, type ImportItem } from '../../../../db/queries/review-import';
import { CliSummaryFile, IMPORT_CAPS, SUMMARY_CAPS } from '../../../../lib/schemas/review';

export interface FileReport {
  index: number;
  name: string;
  subjectCode: string | null;
  fingerprint: string | null;
  conditions: string[];
  channels: number;
  normalizedUnit: string | null;
  problems: { path: string; message: string }[];
}

async function readBodyBytes(request: Request, maxBytes: number): Promise<Uint8Array<ArrayBuffer>> {
  const tooLarge = () => new HttpError(413, 'too_large', `The upload is larger than ${maxBytes} bytes in all; import the files in several batches.`);
  const declared = request.headers.get('content-length');
  if (declared !== null && !(Number(declared) <= maxBytes)) throw tooLarge();
  if (!request.body) return new Uint8Array(0);
  const reader = request.body.getReader();
  const chunks: Uint8Array[] = [];
  let total = 0;
  for (;;) {
    const { done, value } = await reader.read();
    if (done) break;
    total += value.byteLength;
    if (total > maxBytes) {
      await reader.cancel().catch(() => {});
      throw tooLarge();
    }
    chunks.push(value);
  }
  const all = new Uint8Array(total);
  let at = 0;
  for (const c of chunks) {
    all.set(c, at);
    at += c.byteLength;
  }
  return all;
}

const pathOf = (path: PropertyKey[]) => path.reduce<string>((s, k) => (typeof k === 'number' ? `${s}[${k}]` : s === '' ? String(k) : `${s}.${String(k)}`), '') || '(file)';
const shortName = (name: string) => (name.length > 80 ? `${name.slice(0, 77)}…` : name);

/** Reads one uploaded file: its report and, when it has no problem, the item to import. */
async function checkFile(file: File, index: number): Promise<{ report: FileReport; item: ImportItem | null }> {
  const name = shortName(file.name || `file ${index + 1}`);
  const report: FileReport = { index, name, subjectCode: null, fingerprint: null, conditions: [], channels: 0, normalizedUnit: null, problems: [] };
  const problem = (path: string, message: string) => {
    report.problems.push({ path, message });
    return { report, item: null };
  };
  if (file.size > IMPORT_CAPS.fileBytes) return problem('(file)', `is ${file.size} bytes; a summary file holds at most ${IMPORT_CAPS.fileBytes}`);
  let text: string;
  try {
    text = new TextDecoder('utf-8', { fatal: true }).decode(await file.arrayBuffer());
  } catch {
    return problem('(file)', 'is not UTF-8 text (a summary file is JSON written by analyze --summary)');
  }
  let data: unknown;
  try {
    data = JSON.parse(text);
  } catch (e) {
    return problem('(file)', `is not valid JSON (${(e as Error).message})`);
  }
  const nul = nulPath(data, '');
  if (nul !== null) return problem(nul || '(file)', 'may not contain the NUL character (U+0000)');
  const parsed = CliSummaryFile.safeParse(data);
  if (!parsed.success) {
    for (const issue of parsed.error.issues.slice(0, 20)) report.problems.push({ path: pathOf(issue.path), message: issue.message });
    if (typeof data === 'object' && data !== null) {
      const d = data as Record<string, unknown>;
      if (typeof d.subjectCode === 'string' && d.subjectCode.length <= 40) report.subjectCode = d.subjectCode;
    }
    return { report, item: null };
  }
  const f = parsed.data;
  report.subjectCode = f.subjectCode;
  report.fingerprint = f.fingerprint;
  report.conditions = f.summary.conditions;
  report.channels = f.summary.channels.length;
  report.normalizedUnit = f.summary.normalizedUnit;
  const summaryBytes = Buffer.byteLength(JSON.stringify(f.summary), 'utf8');
  if (summaryBytes > SUMMARY_CAPS.bodyBytes) return problem('summary', `holds ${summaryBytes} bytes; at most ${SUMMARY_CAPS.bodyBytes}`);
  return { report, item: { index, name, file: f, summaryBytes } };
}

export const POST: APIRoute = (ctx) =>
  route(ctx, async ({ locals, params, request }) => {
    const user = requireUser(locals);
    const found = (await getStudyForMember(params.studyId!, user.id)) ?? notFound('The study');
    requirePermission(found.role, 'summary:import');
    const type = request.headers.get('content-type') ?? '';
    if (!/^multipart\/form-data\s*;/i.test(type)) throw new HttpError(415, 'unsupported_media_type', 'Send the summary files as multipart/form-data (one "files" part per file).');
    const bytes = await readBodyBytes(request, IMPORT_CAPS.bodyBytes);
    let form: FormData;
    try {
      form = await new Response(bytes, { headers: { 'content-type': type } }).formData();
    } catch {
      throw new HttpError(400, 'bad_multipart', 'The upload could not be read as multipart/form-data. Nothing was imported.');
    }
    const intent = form.get('intent');
    if (intent !== 'preview' && intent !== 'import') {
      throw new HttpError(400, 'invalid', 'intent: must be "preview" or "import". Nothing was imported.', [{ path: 'intent', message: 'must be "preview" or "import"' }]);
    }
    const files = form.getAll('files').filter((f): f is File => typeof f !== 'string');
    if (files.length === 0) throw new HttpError(400, 'invalid', 'files: choose at least one summary file. Nothing was imported.', [{ path: 'files', message: 'choose at least one summary file' }]);
    if (files.length > IMPORT_CAPS.files) {
      throw new HttpError(400, 'invalid', `files: ${files.length} files; at most ${IMPORT_CAPS.files} in one batch. Nothing was imported.`, [{ path: 'files', message: `at most ${IMPORT_CAPS.files} files` }]);
    }
    const checked = await Promise.all(files.map((f, i) => checkFile(f, i)));
    const reports = checked.map((c) => c.report);
    // One session per subject and recording: within the batch, and against the study's sessions.
    const seen = new Map<string, string>();
    for (const c of checked) {
      if (c.item === null) continue;
      const key = `${c.item.file.subjectCode}\u0000${c.item.file.fingerprint}`;
      const first = seen.get(key);
      if (first !== undefined) c.report.problems.push({ path: 'fingerprint', message: `subject ${c.item.file.subjectCode}'s recording is also in ${first}; import it once` });
      else seen.set(key, c.report.name);
      const existing = await sessionFor(db, found.study.id, c.item.file.subjectCode, c.item.file.fingerprint);
      if (existing) c.report.problems.push({ path: 'subjectCode', message: duplicateSessionWords(c.item.file.subjectCode, existing) });
    }
    const bad = reports.filter((r) => r.problems.length > 0);
    const describe = (r: FileReport) => `${r.name}: ${r.problems[0].path}: ${r.problems[0].message}`;
    if (intent === 'preview') return json({ files: reports, ready: bad.length === 0 });
    if (bad.length > 0) {
      return json(
        { error: { code: 'invalid', message: `Nothing was imported: ${bad.length} of ${reports.length} files ${bad.length === 1 ? 'has a problem' : 'have problems'}. ${describe(bad[0])}` }, files: reports },
        400,
      );
    }
    const result = await importSummaries(found.study, found.team.id, user.id, checked.map((c) => c.item!));
    if (!result.ok) {
      for (const p of result.problems) reports[p.index].problems.push({ path: 'subjectCode', message: p.message });
      const first = reports.find((r) => r.problems.length > 0)!;
      return json({ error: { code: 'session_exists', message: `Nothing was imported. ${describe(first)}` }, files: reports }, 409);
    }
    return json({ imported: result.sessions.map(({ versionId: _v, ...s }) => ({ ...s, name: reports[s.index].name })), files: reports }, 201);
  });
