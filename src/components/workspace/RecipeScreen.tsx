import type { WorkspaceProps } from './types';

export default function RecipeScreen(_props: WorkspaceProps) {
  return <p className="text-ink-soft">The Recipe screen is not built yet.</p>;
}
