import { reviewOutbox, type OutboxItem } from '../../lib/client/review/outbox';

/** What this browser still has to send for the session, and what the server refused (with a way to discard it). */
export default function OutboxNotices({ items, userId }: { items: OutboxItem[]; userId: string }) {
  const waiting = items.filter((i) => i.state !== 'refused');
  const refused = items.filter((i) => i.state === 'refused');
  return (
    <>
      {waiting.length > 0 && (
        <div className="notice notice-warn mt-2" role="status" data-testid="outbox-waiting">
          <p>
            {waiting.length === 1 ? '1 item waits' : `${waiting.length} items wait`} in this browser to be sent. {waiting[0].problem ?? 'Sending…'}
          </p>
          <ul className="mt-1 list-disc pl-5 text-sm">
            {waiting.map((i) => (
              <li key={i.clientKey} data-testid="outbox-item" data-state={i.state}>
                {i.kind === 'recipe-draft' ? 'recipe draft' : i.kind}: “{String(i.body.body ?? '').slice(0, 80)}” · {i.state === 'sending' ? 'sending' : 'waiting'}
              </li>
            ))}
          </ul>
        </div>
      )}
      {refused.length > 0 && (
        <div className="notice notice-warn mt-2" role="alert" data-testid="outbox-refused">
          {refused.map((i) => (
            <p key={i.clientKey}>
              Not sent: “{String(i.body.body ?? '').slice(0, 80)}” — {i.problem}{' '}
              <button type="button" className="underline" onClick={() => void reviewOutbox(userId).discard(i.clientKey)}>
                Discard it
              </button>
            </p>
          ))}
        </div>
      )}
    </>
  );
}
