import type { WorkspaceProps } from './types';

export default function SpectrumScreen(_props: WorkspaceProps) {
  return <p className="text-ink-soft">The Spectrum screen is not built yet.</p>;
}
