import { useRef } from 'react';
import type { SlopeReportInputT } from '../../lib/schemas/slope-reports';
import { slopeReportCsv } from '../../lib/client/slope-report';
import BenchChart, { svgFileOf } from './BenchChart';
import { downloadBlob, fileSafe } from '../explorer/download';

const fmt = (v: number | null, digits = 3) => (v === null ? '—' : v.toFixed(digits));

/** The bench's chart, its figures per setting × true exponent, and the CSV and SVG exports of one report. */
export default function BenchResults({ report, testId = 'bench-results' }: { report: SlopeReportInputT; testId?: string }) {
  const svg = useRef<SVGSVGElement>(null);
  const base = fileSafe(`slope-check-${report.title}`);
  const failures = report.results.filter((r) => r.failed > 0);
  return (
    <div data-testid={testId}>
      <BenchChart ref={svg} report={report} />
      <p className="mt-1 text-xs text-ink-soft">
        Whiskers: ± one standard deviation of the estimates across the {report.truth.repetitions} repetitions (spread). Dashed line: a perfect estimate (left), no
        bias (right). Every setting sees the same simulated series (paired comparison).
      </p>
      <table className="data-table mt-3" data-testid="bench-table">
        <thead>
          <tr>
            <th scope="col">Setting</th>
            <th scope="col">True χ</th>
            <th scope="col">Mean estimate</th>
            <th scope="col">Bias</th>
            <th scope="col">Spread (SD)</th>
            <th scope="col">RMSE</th>
            {report.coverageLevel !== null && <th scope="col">Coverage of {Math.round(report.coverageLevel * 100)} % intervals</th>}
            <th scope="col">Failed fits</th>
          </tr>
        </thead>
        <tbody>
          {report.results.map((r) => (
            <tr key={`${r.setting}@${r.trueExponent}`} data-testid="bench-row">
              <td>{r.setting}</td>
              <td className="font-mono">{r.trueExponent}</td>
              <td className="font-mono">{fmt(r.meanEstimate)}</td>
              <td className="font-mono">{fmt(r.bias)}</td>
              <td className="font-mono">{fmt(r.spread)}</td>
              <td className="font-mono">{fmt(r.rmse)}</td>
              {report.coverageLevel !== null && <td className="font-mono">{r.coverage === null ? '—' : `${Math.round(r.coverage * 100)} %`}</td>}
              <td className="font-mono">{r.failed}</td>
            </tr>
          ))}
        </tbody>
      </table>
      {failures.length > 0 && (
        <p className="notice notice-warn mt-2 text-sm">
          Some fits failed ({failures.map((r) => `${r.setting} at χ = ${r.trueExponent}: ${r.failed}`).join('; ')}); the figures use the fits that ran.
        </p>
      )}
      <div className="mt-3 flex flex-wrap gap-2">
        <button type="button" className="btn btn-quiet" onClick={() => downloadBlob(new Blob([slopeReportCsv(report)], { type: 'text/csv' }), `${base}.csv`)} data-testid="bench-export-csv">
          Export CSV
        </button>
        <button type="button" className="btn btn-quiet" onClick={() => svg.current && downloadBlob(new Blob([svgFileOf(svg.current)], { type: 'image/svg+xml' }), `${base}.svg`)} data-testid="bench-export-svg">
          Export SVG
        </button>
      </div>
    </div>
  );
}
