import { useEffect, useMemo, useRef, useState } from 'react';
import { selectActive, useResultsStore } from '../../lib/client/workspace/results';
import { useWorkspace } from '../../lib/client/workspace/store';
import { methodsTextOf, type MethodsText as Text } from '../../lib/client/workspace/methods-text';

/** The paragraph and its references as one text to paste into a manuscript. */
export function methodsPlainText(text: Text): string {
  return text.references.length === 0 ? text.paragraph : `${text.paragraph}\n\nReferences\n${text.references.join('\n')}`;
}

/** `value`, once it has stayed the same for `ms`: a drag rewrites the paragraph when it stops, not at every frame. */
function useSettled<T>(value: T, ms: number): T {
  const [settled, setSettled] = useState(value);
  useEffect(() => {
    if (Object.is(settled, value)) return;
    const id = setTimeout(() => setSettled(value), ms);
    return () => clearTimeout(id);
  }, [value, settled, ms]);
  return settled;
}

/**
 * "Methods text": the generated methods paragraph of what the maps show (the run's recipe with the live baseline
 * and fit range), selectable, with a Copy button and the works it cites.
 */
export default function MethodsText() {
  const d = useResultsStore(selectActive);
  const baseline = useSettled(useWorkspace((s) => s.baseline), 250);
  const method = useWorkspace((s) => s.method);
  const scope = useWorkspace((s) => s.scope);
  const spread = useWorkspace((s) => s.spread);
  const fitRange = useSettled(useWorkspace((s) => s.fitRange), 250);
  const [status, setStatus] = useState<string | null>(null);
  const body = useRef<HTMLDivElement>(null);

  const made = useMemo((): { text: Text } | { error: string } | null => {
    if (d === null) return null;
    try {
      return { text: methodsTextOf(d, { baseline, method, scope, spread, fitRange }) };
    } catch (error) {
      return { error: error instanceof Error ? error.message : String(error) };
    }
  }, [d, baseline, method, scope, spread, fitRange]);
  if (made === null) return null;

  const copy = async () => {
    if (!('text' in made)) return;
    try {
      await navigator.clipboard.writeText(methodsPlainText(made.text));
      setStatus('Copied the paragraph and its references.');
    } catch {
      // No clipboard access (permission refused, insecure context): select the text for the person to copy.
      const selection = window.getSelection();
      if (selection !== null && body.current !== null) selection.selectAllChildren(body.current);
      setStatus('The browser refused the clipboard; the text is selected: press Ctrl+C (⌘C) to copy it.');
    }
  };

  return (
    <section className="card p-3" aria-labelledby="methods-text-title" data-testid="methods-text">
      <div className="mb-2 flex flex-wrap items-center gap-3">
        <h2 id="methods-text-title" className="text-sm font-semibold">
          Methods text
        </h2>
        <button type="button" className="rounded-sm border border-kelp px-3 py-1 text-sm text-kelp-deep hover:bg-kelp-pale disabled:opacity-50" onClick={() => void copy()} disabled={!('text' in made)} data-testid="methods-copy">
          Copy
        </button>
        <p role="status" className="text-xs text-ink-soft" data-testid="methods-status">
          {status}
        </p>
      </div>
      {'text' in made ? (
        <div ref={body} className="select-text">
          <p className="max-w-prose text-sm leading-relaxed" data-testid="methods-paragraph">
            {made.text.paragraph}
          </p>
          {made.text.references.length > 0 && (
            <ol className="mt-2 max-w-prose list-none text-xs text-ink-soft" data-testid="methods-references">
              {made.text.references.map((r) => (
                <li key={r} className="mb-1">
                  {r}
                </li>
              ))}
            </ol>
          )}
        </div>
      ) : (
        <p role="alert" className="text-sm text-coral-deep">
          No methods text for these settings: {made.error}
        </p>
      )}
      <p className="mt-2 text-xs text-ink-soft">Written from the recipe of this run with the baseline and fit range now set. Check it against your own records before you publish; Tidemark is a research tool, not a medical device.</p>
    </section>
  );
}
