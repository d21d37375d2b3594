import type { WorkspaceProps } from './types';

export default function BandsScreen(_props: WorkspaceProps) {
  return <p className="text-ink-soft">The Bands screen is not built yet.</p>;
}
