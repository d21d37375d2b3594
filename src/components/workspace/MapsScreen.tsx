import type { WorkspaceProps } from './types';

export default function MapsScreen(_props: WorkspaceProps) {
  return <p className="text-ink-soft">The Maps screen is not built yet.</p>;
}
