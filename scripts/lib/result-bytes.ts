// Memory of one run's output as the workspace holds it (`npm run bench`, pool phase): the decomposition built
// from the workers' typed arrays, and what the nested Result JSON of the same run occupies on the V8 heap (the
// browser built it, then copied it back into typed arrays, until the controller took the arrays directly).
import v8 from 'node:v8';
import vm from 'node:vm';
import { assembleResult, type ChannelAnalysis, type RecipePlan } from '../../src/lib/analysis/run-recipe';
import { bytesOf } from '../../src/lib/client/workspace/cache-budget';
import { decompositionOf } from '../../src/lib/client/workspace/results';

v8.setFlagsFromString('--expose-gc');
const gc = vm.runInNewContext('gc') as () => void;

function heapUsed(): number {
  gc();
  gc();
  return process.memoryUsage().heapUsed;
}

export interface ResultBytes {
  /** Typed arrays the decomposition holds (`sizeOfDecomposition`), spectra included. */
  decomposition: number;
  /** Of which the Spectrum screen's spectra (per-epoch and full recipe spectra, now kept with the run). */
  spectra: number;
  /** V8 heap taken by the nested Result JSON of the same run (`assembleResult`), measured. */
  resultJson: number;
}

export function resultBytes(recipe: unknown, plan: RecipePlan, channels: ChannelAnalysis[]): ResultBytes {
  const d = decompositionOf('bench', recipe as Parameters<typeof decompositionOf>[1], 'bench', plan, channels);
  const decomposition = bytesOf(d);
  const spectra = bytesOf({ e: d.epochSpectra, r: d.recipeSpectra });
  const before = heapUsed();
  const json = assembleResult(plan, channels);
  const resultJson = heapUsed() - before;
  if (json.channels.length !== plan.channels.length) throw new Error('unexpected Result');
  return { decomposition, spectra, resultJson };
}
