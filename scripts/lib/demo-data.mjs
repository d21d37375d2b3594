// Generates the demo cohort (EDF+ files, git-ignored) when missing; the generator skips files already present.
import { spawnSync } from 'node:child_process';
import path from 'node:path';
import { fail, log, root } from './bootstrap.mjs';

export function generateDemoData(args = []) {
  log('checking the demo cohort (npm run demo:data)…');
  const result = spawnSync(process.execPath, ['--import', 'tsx', path.join(root, 'scripts', 'demo-data.ts'), ...args], {
    cwd: root,
    stdio: ['ignore', 'inherit', 'inherit'],
  });
  if (result.status !== 0) fail('generating the demo cohort failed (see above)');
}
