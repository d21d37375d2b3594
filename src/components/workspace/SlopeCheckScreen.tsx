import { useState } from 'react';
import type { WorkspaceProps } from './types';
import { can } from '../../lib/permissions';
import type { SensitivityResult } from '../../lib/client/slope-check';
import { slopeReportOf } from '../../lib/client/slope-report';
import BenchPanel, { type BenchRun } from '../slope/BenchPanel';
import BenchResults from '../slope/BenchResults';
import SaveReport from '../slope/SaveReport';
import SensitivityPanel from '../slope/SensitivityPanel';
import ShiftPanel from '../slope/ShiftPanel';

/**
 * The Slope check (issue 15): how far an aperiodic exponent can be trusted with given settings, how it moves on the
 * open recording, and whether a normalized change could be a broadband shift. Runs in workers; saves figures only.
 */
export default function SlopeCheckScreen(props: WorkspaceProps) {
  const [bench, setBench] = useState<BenchRun | null>(null);
  const [sensitivity, setSensitivity] = useState<SensitivityResult | null>(null);
  const shown = bench === null ? null : slopeReportOf('Slope bench', bench.input, bench.cells, sensitivity);
  const studyHref = `/teams/${props.team.id}/studies/${props.study.id}`;
  return (
    <div className="flex flex-col gap-4" data-testid="slope-check-screen">
      <p className="notice text-sm" data-testid="slope-caution">
        Research use only: these checks describe how an estimate behaves on simulated and on this recording's data. They are not a validated measure and must
        not be used to decide anyone's care.
      </p>
      <BenchPanel onRun={setBench} />
      {shown !== null && (
        <section className="card p-4" aria-labelledby="bench-results-h">
          <h3 id="bench-results-h" className="text-lg font-semibold">Bench results</h3>
          <BenchResults report={shown} />
        </section>
      )}
      <SensitivityPanel onResult={setSensitivity} />
      <ShiftPanel />
      <section className="card p-4" aria-labelledby="slope-report-h">
        <h3 id="slope-report-h" className="text-lg font-semibold">Report</h3>
        <p className="mb-2 max-w-3xl text-sm text-ink-soft">
          A report keeps the bench's truth and fit settings and its figures (bias, spread, RMSE, coverage) and, when it was run, the sensitivity of{' '}
          {sensitivity === null ? 'a channel' : sensitivity.request.channel}: settings and figures only, never samples.
        </p>
        <SaveReport report={shown} maySave={can(props.role, 'slopeReport:save')} studyId={props.study.id} studyHref={studyHref} />
      </section>
    </div>
  );
}
