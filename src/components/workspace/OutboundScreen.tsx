import type { WorkspaceProps } from './types';

export default function OutboundScreen(_props: WorkspaceProps) {
  return <p className="text-ink-soft">The Outbound screen is not built yet.</p>;
}
