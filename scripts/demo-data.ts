// `npm run demo:data [-- --out <dir> --subjects N --seconds S --seed K]`: writes the invented demo cohort as EDF+
// files plus cohort.json (the generator's parameters, so the expected effects are known). A subject whose file is
// present with the same parameters and fingerprint is skipped, so a second run takes about a second.
import { createHash } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { describeCohort, writeSubjectEdf, type SubjectParameters } from '../src/lib/demo/cohort';

interface CohortFileSubject extends SubjectParameters {
  bytes: number;
  fingerprint: string;
}

function parseArgs(argv: string[]): { out: string; subjects: number; seconds: number; seed: number | undefined } {
  const args = { out: 'demo-data', subjects: 12, seconds: 300, seed: undefined as number | undefined };
  for (let i = 0; i < argv.length; i++) {
    const flag = argv[i];
    const value = argv[i + 1];
    const number = () => {
      const n = Number(value);
      if (value === undefined || !Number.isInteger(n) || n < 1) usage(`${flag} needs a positive whole number`);
      i++;
      return n;
    };
    if (flag === '--out') {
      if (value === undefined) usage('--out needs a directory');
      args.out = value;
      i++;
    } else if (flag === '--subjects') args.subjects = number();
    else if (flag === '--seconds') args.seconds = number();
    else if (flag === '--seed') args.seed = number();
    else usage(`unknown option ${flag}`);
  }
  if (args.seconds < 10) usage('--seconds must be at least 10');
  return args;
}

function usage(problem: string): never {
  process.stderr.write(`demo-data: ${problem}\nusage: npm run demo:data -- [--out <dir>] [--subjects N] [--seconds S] [--seed K]\n`);
  process.exit(2);
}

const sha256 = (bytes: Uint8Array) => createHash('sha256').update(bytes).digest('hex');

function readPrevious(file: string): Map<string, CohortFileSubject> {
  try {
    const json = JSON.parse(fs.readFileSync(file, 'utf8')) as { subjects?: CohortFileSubject[] };
    return new Map((json.subjects ?? []).map((s) => [s.fileName, s]));
  } catch {
    return new Map();
  }
}

function unchanged(previous: CohortFileSubject | undefined, params: SubjectParameters, file: string): previous is CohortFileSubject {
  if (previous === undefined) return false;
  const { bytes, fingerprint, ...rest } = previous;
  if (JSON.stringify(rest) !== JSON.stringify(params)) return false;
  if (!fs.existsSync(file) || fs.statSync(file).size !== bytes) return false;
  return sha256(fs.readFileSync(file)) === fingerprint;
}

const args = parseArgs(process.argv.slice(2));
const started = performance.now();
const outDir = path.resolve(args.out);
fs.mkdirSync(outDir, { recursive: true });
const cohortFile = path.join(outDir, 'cohort.json');
const previous = readPrevious(cohortFile);
const cohort = describeCohort({ subjects: args.subjects, seconds: args.seconds, seed: args.seed });
const subjects: CohortFileSubject[] = [];
let written = 0;
for (const params of cohort.subjects) {
  const file = path.join(outDir, params.fileName);
  const before = previous.get(params.fileName);
  if (unchanged(before, params, file)) {
    subjects.push(before);
    continue;
  }
  const bytes = writeSubjectEdf(params);
  const temporary = `${file}.part`;
  fs.writeFileSync(temporary, bytes);
  fs.renameSync(temporary, file);
  subjects.push({ ...params, bytes: bytes.length, fingerprint: sha256(bytes) });
  written++;
  process.stdout.write(`demo-data: wrote ${params.fileName} (${params.code}, ${(bytes.length / 1e6).toFixed(1)} MB)\n`);
}
fs.writeFileSync(cohortFile, JSON.stringify({ ...cohort, subjects }, null, 1) + '\n');
const seconds = ((performance.now() - started) / 1000).toFixed(1);
process.stdout.write(`demo-data: ${subjects.length} subjects in ${path.relative(process.cwd(), outDir) || '.'} (${written} written, ${subjects.length - written} unchanged) in ${seconds} s\n`);
