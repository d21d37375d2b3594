import { MEANING_WORDS } from '../../lib/client/review/actions';
import type { SignatureView } from '../../lib/client/review/types';
import { when } from './when';

/** The signature manifest: printed name, time, meaning, version, SHA-256 of what was signed. */
export default function Manifest({ signatures, currentVersion }: { signatures: SignatureView[]; currentVersion: number | null }) {
  if (signatures.length === 0) return <p className="text-sm text-ink-soft">Not signed.</p>;
  return (
    <>
      <table className="data-table mt-2" data-testid="signature-manifest">
        <thead>
          <tr>
            <th scope="col">Signed by</th>
            <th scope="col">When</th>
            <th scope="col">Meaning</th>
            <th scope="col">Version</th>
            <th scope="col">Content SHA-256</th>
          </tr>
        </thead>
        <tbody>
          {signatures.map((s) => (
            <tr key={s.id} data-meaning={s.meaning}>
              <td>{s.printedName}</td>
              <td className="font-mono text-xs">{when(s.signedAt)}</td>
              <td>
                {MEANING_WORDS[s.meaning]}
                {s.reason ? `: ${s.reason}` : ''}
              </td>
              <td className="font-mono">
                {s.recipeVersion}
                {s.recipeVersion !== currentVersion ? ' (earlier version)' : ''}
              </td>
              <td className="font-mono text-2xs break-all">{s.contentHash}</td>
            </tr>
          ))}
        </tbody>
      </table>
      <p className="mt-1 text-2xs text-ink-soft">Each hash is a SHA-256 over the recipe version and its summary in RFC 8785 canonical JSON; a later version is not covered by an earlier signature.</p>
    </>
  );
}
