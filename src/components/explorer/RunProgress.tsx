import { showDecomposition, type Decomposition } from '../../lib/client/workspace/results';
import type { RunChannelProgress } from '../../lib/client/workspace/recipe';

/** One progress bar per channel of the running (or last) decomposition. */
export default function RunProgress({ progress }: { progress: RunChannelProgress[] }) {
  if (progress.length === 0) return null;
  return (
    <ul className="card grid grid-cols-[repeat(auto-fill,minmax(11rem,1fr))] gap-x-4 gap-y-1 p-3" data-testid="recipe-progress">
      {progress.map((p) => (
        <li key={p.channel} className="flex items-center gap-2 font-mono text-xs">
          <span className="w-12">{p.channel}</span>
          <div role="progressbar" aria-label={`${p.channel} progress`} aria-valuemin={0} aria-valuemax={100} aria-valuenow={Math.round(p.fraction * 100)} data-fraction={p.fraction} className="h-2 flex-1 overflow-hidden rounded-sm bg-sand-deep">
            <div className="h-full bg-kelp" style={{ width: `${p.fraction * 100}%` }} />
          </div>
          <span className="w-10 text-right">{Math.round(p.fraction * 100)} %</span>
        </li>
      ))}
    </ul>
  );
}

/** The decompositions the controller keeps in memory; choosing one shows it on the other screens. */
export function ComputedList({ cache, activeKey }: { cache: Record<string, Decomposition>; activeKey: string | null }) {
  const all = Object.values(cache);
  if (all.length === 0) return null;
  return (
    <section className="card p-3">
      <h3 className="text-sm font-semibold">Computed this session (kept in memory while they fit its budget; switching back is instant)</h3>
      <ul className="mt-1 text-sm">
        {all.map((d) => (
          <li key={d.key} className="flex items-center gap-2">
            <button type="button" className="text-kelp-deep underline" onClick={() => showDecomposition(d.key)}>
              {d.channels.length} ch · {d.frequencies.length} freqs {d.recipe.frequencies.min}–{d.recipe.frequencies.max} Hz ({d.spacing}) · {d.labels.join(', ')}
            </button>
            {d.key === activeKey && <span className="text-xs text-ink-soft">(shown)</span>}
          </li>
        ))}
      </ul>
    </section>
  );
}
