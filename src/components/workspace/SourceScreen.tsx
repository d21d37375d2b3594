import type { WorkspaceProps } from './types';

export default function SourceScreen(_props: WorkspaceProps) {
  return <p className="text-ink-soft">The Source screen is not built yet.</p>;
}
