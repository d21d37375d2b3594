import { useRef, useState } from 'react';
import { loadRecipeText } from '../../lib/client/workspace/apply-recipe';

/** "Load recipe JSON": a file chooser and what came of the last file (applied, or why nothing was changed). */
export default function LoadRecipe() {
  const fileInput = useRef<HTMLInputElement>(null);
  const [loaded, setLoaded] = useState<{ ok: boolean; text: string } | null>(null);
  return (
    <div className="card flex flex-wrap items-center gap-3 p-3">
      <button type="button" className="rounded-sm border border-kelp px-3 py-1 text-sm text-kelp-deep hover:bg-kelp-pale" onClick={() => fileInput.current?.click()} data-testid="load-recipe">
        Load recipe JSON
      </button>
      <input
        ref={fileInput}
        type="file"
        accept="application/json,.json"
        className="sr-only"
        aria-label="Recipe JSON file"
        data-testid="load-recipe-file"
        onChange={(e) => {
          const file = e.target.files?.[0];
          e.target.value = '';
          if (file !== undefined) void file.text().then((text) => setLoaded(loadRecipeText(file.name, text)));
        }}
      />
      <span className="text-xs text-ink-soft">sets conditions, epochs, rejection, frequencies, wavelets, baseline, spectrum and fit from an exported recipe</span>
      {loaded !== null && (
        <p className={`basis-full text-sm ${loaded.ok ? 'text-kelp-deep' : 'text-coral-deep'}`} role={loaded.ok ? 'status' : 'alert'} data-testid="load-recipe-message">
          {loaded.text}
        </p>
      )}
    </div>
  );
}
