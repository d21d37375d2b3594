import type { ReactNode } from 'react';

export const SOURCE_STEPS = ['recording', 'channels', 'events', 'epochs', 'session'] as const;
export type SourceStepId = (typeof SOURCE_STEPS)[number];

interface Props {
  step: SourceStepId;
  title: string;
  /** One line of where this step stands, shown beside the title whether the step is open or folded. */
  digest: ReactNode;
  open: boolean;
  onToggle: (open: boolean) => void;
  testId?: string;
  children: ReactNode;
}

/**
 * One numbered step of the Source screen, foldable: its title and one-line digest stay in view when folded, so the
 * recording, the events and the epochs can all be read without scrolling through every table.
 */
export default function SourceStep({ step, title, digest, open, onToggle, testId, children }: Props) {
  const headingId = `source-${step}`;
  return (
    <details
      id={`step-${step}`}
      className="card min-w-0 scroll-mt-28"
      open={open}
      onToggle={(e) => {
        const now = (e.currentTarget as HTMLDetailsElement).open;
        if (now !== open) onToggle(now);
      }}
      data-testid={testId}
      data-step={step}
    >
      <summary className="flex cursor-pointer flex-wrap items-baseline gap-x-3 gap-y-1">
        <h2 id={headingId} className="text-lg font-semibold">
          <span className="mr-2 font-mono text-sm text-ink-soft" aria-hidden="true">
            {SOURCE_STEPS.indexOf(step) + 1}
          </span>
          {title}
        </h2>
        <span className="text-sm text-ink-soft" data-testid={`digest-${step}`}>
          {digest}
        </span>
        <span className="ml-auto text-xs text-ink-soft">{open ? 'fold' : 'unfold'}</span>
      </summary>
      <section className="mt-3 grid min-w-0 gap-3" aria-labelledby={headingId}>
        {children}
      </section>
    </details>
  );
}
