import type { IntakePhase } from '../../lib/client/intake';

export interface Busy {
  fileName: string;
  phase: IntakePhase | 'download';
  fraction: number;
}

const PHASES: Record<Busy['phase'], string> = {
  download: 'Fetching the demo file from the app',
  fingerprint: 'Computing the SHA-256 fingerprint',
  reading: 'Reading the samples',
  events: 'Reading the events',
};

/** What the intake is doing with which file, and how far it is. */
export default function IntakeProgress({ busy }: { busy: Busy }) {
  return (
    <div className="grid gap-1" role="status" data-testid="intake-progress">
      <label htmlFor="intake-progress-bar" className="text-sm">
        {PHASES[busy.phase]} of {busy.fileName}… {busy.phase === 'download' ? '' : `${Math.round(busy.fraction * 100)} %`}
      </label>
      <progress id="intake-progress-bar" max={1} value={busy.phase === 'download' ? undefined : busy.fraction} className="h-2 w-full" />
    </div>
  );
}
