import type { ReactNode } from 'react';
import type { IntakeProblem } from '../../lib/client/intake';

/** Why a file could not be opened, and where (field, signal, byte offset, row, column); nothing else changed. */
export default function IntakeProblemNotice({ fileName, error, onDismiss, children }: { fileName: string; error: IntakeProblem; onDismiss: () => void; children?: ReactNode }) {
  const where: [string, string][] = [];
  if (error.field) where.push(['Field', error.field]);
  if (error.signal) where.push(['Signal', error.signal]);
  if (error.byteOffset !== null) where.push(['Byte offset', String(error.byteOffset)]);
  if (error.row !== null) where.push(['Row', String(error.row)]);
  if (error.column) where.push(['Column', error.column]);
  return (
    <div className="notice notice-warn grid gap-2" role="alert" data-testid="intake-problem">
      <p className="font-semibold">
        {fileName}
        {error.file === 'events' ? ' (events file)' : ''} could not be opened: {error.message}
      </p>
      {where.length > 0 && (
        <dl className="grid grid-cols-[max-content_1fr] gap-x-3 text-sm">
          {where.map(([k, v]) => (
            <div key={k} className="contents">
              <dt>{k}</dt>
              <dd className="font-mono break-all">{v}</dd>
            </div>
          ))}
        </dl>
      )}
      <p className="text-sm">Nothing else changed: the recording you had open and the library are as they were.</p>
      {children}
      <button type="button" className="btn btn-quiet justify-self-start" onClick={onDismiss}>
        Dismiss
      </button>
    </div>
  );
}

