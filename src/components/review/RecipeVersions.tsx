import type { SessionView } from '../../lib/client/review/types';
import { when } from './when';

/** Every saved recipe version, newest first, with its recipe's and summary's SHA-256 in short. */
export default function RecipeVersions({ versions, currentVersion }: { versions: SessionView['versions']; currentVersion: number | null }) {
  return (
    <>
      {versions.length === 0 ? (
        <p className="text-sm text-ink-soft">None saved yet.</p>
      ) : (
        <table className="data-table mt-2" data-testid="recipe-versions">
          <thead>
            <tr>
              <th scope="col">Version</th>
              <th scope="col">Saved</th>
              <th scope="col">Recipe SHA-256</th>
              <th scope="col">Summary SHA-256</th>
            </tr>
          </thead>
          <tbody>
            {[...versions].reverse().map((v) => (
              <tr key={v.number}>
                <td className="font-mono">
                  {v.number}
                  {v.number === currentVersion ? ' (current)' : ''}
                </td>
                <td className="font-mono text-xs">{when(v.createdAt)}</td>
                <td className="font-mono text-2xs">{v.recipeHash.slice(0, 16)}…</td>
                <td className="font-mono text-2xs">{v.summaryHash ? `${v.summaryHash.slice(0, 16)}…` : '—'}</td>
              </tr>
            ))}
          </tbody>
        </table>
      )}
    </>
  );
}
