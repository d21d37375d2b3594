import { useSyncExternalStore } from 'react';
import type { WorkspaceProps } from './types';
import { outboundLog, subscribeOutbound } from '../../lib/client/outbound';

/** What this tab sent to the server, request by request, with the exact body text. */
export default function OutboundScreen(_props: WorkspaceProps) {
  const entries = useSyncExternalStore(subscribeOutbound, outboundLog, outboundLog);
  return (
    <div className="grid gap-4">
      <p className="text-sm">
        Every request this tab&apos;s workspace made, with the exact body sent. Recordings, their file names and header fields never
        appear here: they stay on this device. Loading the page and its scripts is not listed.
      </p>
      {entries.length === 0 ? (
        <p className="text-ink-soft">Nothing sent yet.</p>
      ) : (
        <div className="overflow-x-auto">
          <table className="data-table" data-testid="outbound-log" aria-label="Requests sent by this tab">
            <thead>
              <tr>
                <th scope="col">Time</th>
                <th scope="col">Method</th>
                <th scope="col">Path</th>
                <th scope="col">Answer</th>
                <th scope="col">Body sent</th>
              </tr>
            </thead>
            <tbody>
              {[...entries].reverse().map((e) => (
                <tr key={e.id} data-testid="outbound-entry">
                  <td className="font-mono text-xs whitespace-nowrap">{new Date(e.sentAt).toLocaleTimeString()}</td>
                  <td className="font-mono text-xs">{e.method}</td>
                  <td className="font-mono text-xs break-all">{e.path}</td>
                  <td className="font-mono text-xs">{e.failure ?? e.status ?? '…'}</td>
                  <td>
                    {e.body === null ? (
                      <span className="text-ink-soft">none</span>
                    ) : (
                      <pre className="font-mono text-xs break-all whitespace-pre-wrap">{e.body}</pre>
                    )}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
    </div>
  );
}
