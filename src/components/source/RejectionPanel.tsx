import { useEffect, useId, useState } from 'react';
import type { Recording } from '../../lib/analysis/recording';
import type { ChannelType, ChannelUnit } from '../../lib/analysis/channel-types';
import type { ConditioningSettings, EpochDecision, RejectionSettings } from '../../lib/client/workspace/source-rules';
import { byTypeWith, conditionTally, rejectionTypes } from '../../lib/client/workspace/source-panels';
import EpochTable from './EpochTable';

interface Props {
  recording: Recording;
  rejection: RejectionSettings;
  conditioning: ConditioningSettings;
  decisions: EpochDecision[];
  overviewChannel: string;
  onRejection: (patch: Partial<Omit<RejectionSettings, 'overrides'>>) => void;
  onOverride: (eventIndex: number, decision: 'keep' | 'reject' | null) => void;
  onSelect: (eventIndex: number) => void;
}

function NumberSetting(props: { id: string; label: string; value: number | null; fallback: number; onChange: (v: number | null) => void; hint: string }) {
  const [text, setText] = useState(props.value === null ? String(props.fallback) : String(props.value));
  const [error, setError] = useState<string | null>(null);
  const on = props.value !== null;
  // A loaded recipe changes the value from outside: show it.
  useEffect(() => {
    if (props.value !== null) setText(String(props.value));
  }, [props.value]);
  const commit = (t: string) => {
    const v = Number(t);
    if (t.trim() === '' || !Number.isFinite(v) || v < 0) return setError('Enter a number of µV, zero or more.');
    setError(null);
    props.onChange(v);
  };
  return (
    <div className="grid gap-1">
      <div className="flex items-center gap-2 text-sm">
        <input
          type="checkbox"
          id={`${props.id}-on`}
          checked={on}
          onChange={(e) => (e.target.checked ? commit(text) : props.onChange(null))}
        />
        <label htmlFor={`${props.id}-on`} className="font-semibold">
          {props.label}
        </label>
      </div>
      <div className="field">
        <label htmlFor={props.id} className="text-xs text-ink-soft">
          {props.hint}
        </label>
        <input
          id={props.id}
          inputMode="decimal"
          className="w-32"
          value={text}
          disabled={!on}
          aria-invalid={error !== null}
          onChange={(e) => setText(e.target.value)}
          onBlur={(e) => on && commit(e.target.value)}
          onKeyDown={(e) => e.key === 'Enter' && on && commit((e.target as HTMLInputElement).value)}
        />
        {error && <p className="field-error">{error}</p>}
      </div>
    </div>
  );
}

/** One type's own limits, in its unit; an empty field falls back to the µV rules (µV types) or no check (MEG). */
function TypeLimits(props: { type: ChannelType; unit: ChannelUnit; limits: { peakToPeak: number | null; flat: number | null } | undefined; onChange: (l: { peakToPeak: number | null; flat: number | null } | undefined) => void }) {
  const { type, unit, limits } = props;
  const [p2p, setP2p] = useState(limits?.peakToPeak?.toString() ?? '');
  const [flat, setFlat] = useState(limits?.flat?.toString() ?? '');
  const [error, setError] = useState<string | null>(null);
  useEffect(() => {
    setP2p(limits?.peakToPeak?.toString() ?? '');
    setFlat(limits?.flat?.toString() ?? '');
  }, [limits?.peakToPeak, limits?.flat]);
  const commit = (p: string, f: string) => {
    const parse = (t: string) => (t.trim() === '' ? null : Number(t));
    const a = parse(p);
    const b = parse(f);
    if ((a !== null && !(a > 0)) || (b !== null && !(b >= 0))) return setError(`Enter a number of ${unit} (peak-to-peak above 0), or leave the field empty.`);
    setError(null);
    props.onChange(a === null && b === null ? undefined : { peakToPeak: a, flat: b });
  };
  const fallback = unit === 'µV' ? 'the µV rules above' : 'not checked';
  return (
    <tr data-testid="type-limits" data-type={type}>
      <td className="pr-3">{type}</td>
      <td className="pr-3">
        <input aria-label={`Peak-to-peak limit for ${type} (${unit})`} inputMode="decimal" className="w-40 rounded border border-shell bg-foam px-2 py-0.5" value={p2p} placeholder={fallback} onChange={(e) => setP2p(e.target.value)} onBlur={() => commit(p2p, flat)} onKeyDown={(e) => e.key === 'Enter' && commit(p2p, flat)} />
      </td>
      <td className="pr-3">
        <input aria-label={`Flat limit for ${type} (${unit})`} inputMode="decimal" className="w-40 rounded border border-shell bg-foam px-2 py-0.5" value={flat} placeholder={fallback} onChange={(e) => setFlat(e.target.value)} onBlur={() => commit(p2p, flat)} onKeyDown={(e) => e.key === 'Enter' && commit(p2p, flat)} />
      </td>
      <td className="font-mono">{unit}</td>
      <td>{error && <span className="field-error">{error}</span>}</td>
    </tr>
  );
}

/** The rules (peak-to-peak, flat signal; all channels or chosen ones), the tally per condition and the table. */
export default function RejectionPanel({ recording, rejection, conditioning, decisions, overviewChannel, onRejection, onOverride, onSelect }: Props) {
  const id = useId();
  // The types the rules can meet: brain types (checked across channels) and the types of hand-picked channels.
  const present = rejectionTypes(recording, conditioning, rejection);
  const tally = conditionTally(decisions);
  const chosen = rejection.channels ?? [];
  return (
    <div className="grid gap-4">
      <div className="grid gap-4 sm:grid-cols-2">
        <NumberSetting
          id={`${id}-p2p`}
          label="Peak-to-peak rule"
          hint="Reject above (µV); 150 µV is a common rule of thumb"
          value={rejection.peakToPeakMicrovolts}
          fallback={150}
          onChange={(v) => onRejection({ peakToPeakMicrovolts: v === 0 ? null : v })}
        />
        <NumberSetting
          id={`${id}-flat`}
          label="Flat-signal rule"
          hint="Reject when the SD is below (µV)"
          value={rejection.flatMicrovolts}
          fallback={0.5}
          onChange={(v) => onRejection({ flatMicrovolts: v })}
        />
      </div>
      <fieldset className="grid gap-2 text-sm">
        <legend className="font-semibold">Channels the rules check</legend>
        <label className="flex items-center gap-2">
          <input type="radio" name={`${id}-scope`} checked={rejection.scope === 'any'} onChange={() => onRejection({ scope: 'any' })} />
          Across brain channels (EEG, MEG, intracranial): any one breaking a rule rejects the epoch
        </label>
        <label className="flex items-center gap-2">
          <input
            type="radio"
            name={`${id}-scope`}
            checked={rejection.scope === 'channel'}
            onChange={() => onRejection({ scope: 'channel', channels: chosen.length > 0 ? chosen : [overviewChannel] })}
          />
          Per channel: only the channels picked here
        </label>
        {rejection.scope === 'channel' && (
          <div className="field">
            <label htmlFor={`${id}-channels`}>Checked channels (Ctrl/⌘ or Shift to pick several)</label>
            <select
              id={`${id}-channels`}
              multiple
              size={Math.min(8, recording.channelNames.length)}
              value={chosen}
              onChange={(e) => onRejection({ channels: [...e.target.selectedOptions].map((o) => o.value) })}
            >
              {recording.channelNames.map((n) => (
                <option key={n}>{n}</option>
              ))}
            </select>
          </div>
        )}
      </fieldset>

      {present.length > 0 && (
        <div className="grid gap-1 text-sm">
          <p className="font-semibold">Limits by channel type</p>
          <p className="text-xs text-ink-soft">In each type&apos;s own unit; empty uses the µV rules above for µV channels and leaves MEG unchecked.</p>
          <table>
            <thead>
              <tr className="text-left text-ink-soft">
                <th className="pr-3 font-normal">Type</th>
                <th className="pr-3 font-normal">Peak-to-peak above</th>
                <th className="pr-3 font-normal">Flat below (SD)</th>
                <th className="font-normal">Unit</th>
              </tr>
            </thead>
            <tbody>
              {present.map(([type, unit]) => (
                <TypeLimits
                  key={type}
                  type={type}
                  unit={unit}
                  limits={rejection.byType?.[type]}
                  onChange={(l) => onRejection({ byType: byTypeWith(rejection, type, l) })}
                />
              ))}
            </tbody>
          </table>
        </div>
      )}

      <div className="overflow-x-auto">
        <table className="data-table" data-testid="condition-tally" aria-label="Epochs per condition">
          <thead>
            <tr>
              <th scope="col">Condition</th>
              <th scope="col">Epochs</th>
              <th scope="col">Kept</th>
              <th scope="col">Rejected</th>
              <th scope="col">of which outside the recording</th>
              <th scope="col">of which across a gap</th>
            </tr>
          </thead>
          <tbody>
            {tally.map((t) => (
              <tr key={t.condition}>
                <td className="font-semibold">{t.condition}</td>
                <td className="font-mono">{t.total}</td>
                <td className="font-mono">{t.kept}</td>
                <td className="font-mono">{t.rejected}</td>
                <td className="font-mono">{t.outside}</td>
                <td className="font-mono">{t.gap}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <EpochTable decisions={decisions} onOverride={onOverride} onSelect={onSelect} />
    </div>
  );
}
