import type { ReactNode } from 'react';
import { SOURCE_STEPS, type SourceStepId } from './SourceStep';

interface Props {
  titles: Record<SourceStepId, string>;
  digests: Partial<Record<SourceStepId, ReactNode>>;
  folded: ReadonlySet<SourceStepId>;
  onGo: (step: SourceStepId) => void;
  onFoldAll: (fold: boolean) => void;
}

/**
 * The Source screen's steps in one strip that stays at the top while scrolling: each step's digest (what is open,
 * how many events and conditions, how many epochs are kept), a jump to it, and folding of every step at once.
 */
export default function SourceSteps({ titles, digests, folded, onGo, onFoldAll }: Props) {
  const steps = SOURCE_STEPS.filter((s) => digests[s] !== undefined);
  const allFolded = steps.every((s) => folded.has(s));
  return (
    <nav aria-label="Source steps" className="sticky top-0 z-10 -mx-1 rounded border border-sand-deep bg-sand/95 px-3 py-2 backdrop-blur" data-testid="source-steps">
      <ol className="flex flex-wrap items-center gap-x-4 gap-y-1 text-sm">
        {steps.map((s) => (
          <li key={s}>
            <a
              href={`#step-${s}`}
              className="no-underline hover:underline"
              onClick={(e) => {
                e.preventDefault();
                onGo(s);
              }}
            >
              <span className="font-mono text-xs text-ink-soft">{SOURCE_STEPS.indexOf(s) + 1}</span> <span className="font-semibold text-ink">{titles[s]}</span>
            </a>{' '}
            <span className="text-xs text-ink-soft">{digests[s]}</span>
          </li>
        ))}
        <li className="ml-auto">
          <button type="button" className="btn btn-quiet px-2 py-0.5 text-xs" onClick={() => onFoldAll(!allFolded)} data-testid="fold-all">
            {allFolded ? 'Unfold every step' : 'Fold every step'}
          </button>
        </li>
      </ol>
    </nav>
  );
}
