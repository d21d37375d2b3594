import { useMemo } from 'react';
import { CHANNEL_TYPES, type ChannelType } from '../../lib/analysis/channel-types';
import type { Recording } from '../../lib/analysis/recording';
import type { ConditioningSettings } from '../../lib/client/workspace/source-rules';
import { badWith, channelsView, typesWith } from '../../lib/client/workspace/source-panels';
import FiltersPanel from './FiltersPanel';
import ReferencePanel from './ReferencePanel';

const TYPE_WORDS: Record<ChannelType, string> = {
  eeg: 'EEG (scalp)',
  eog: 'eye (EOG)',
  ecg: 'heart (ECG)',
  emg: 'muscle (EMG)',
  'meg-magnetometer': 'MEG magnetometer',
  'meg-gradiometer': 'MEG gradiometer',
  intracranial: 'intracranial',
  stimulus: 'stimulus / trigger',
  other: 'other',
};

interface Props {
  recording: Recording;
  conditioning: ConditioningSettings;
  onChange: (patch: Partial<ConditioningSettings>) => void;
  /** Why the settings cannot be applied, when a channel or reference field is the cause. */
  problem: string | null;
}

/**
 * Every channel with the type read from the file (EDF+ type word, label, unit) and a way to change it or mark the
 * channel bad. Brain channels are analysed, referenced and checked for rejection; the others only when named.
 */
export default function ChannelsPanel({ recording, conditioning, onChange, problem }: Props) {
  const { rows, analysed, electrodes, intracranial } = useMemo(() => channelsView(recording, conditioning), [recording, conditioning]);
  return (
    <div className="grid gap-2">
      <p className="text-sm text-ink-soft" data-testid="channels-summary">
        {analysed} of {recording.channelNames.length} channels are brain channels in use: analysed, referenced and checked for rejection unless the
        recipe names others. A bad channel is left out everywhere.
      </p>
      <div className="max-h-72 overflow-auto">
        <table className="w-full text-sm" data-testid="channels-table">
          <thead>
            <tr className="text-left text-ink-soft">
              <th className="pr-3 font-normal">Channel</th>
              <th className="pr-3 font-normal">Type</th>
              <th className="pr-3 font-normal">Unit</th>
              <th className="font-normal">Bad</th>
            </tr>
          </thead>
          <tbody>
            {rows.map(({ name, type, fromFile, unit, bad }) => (
              <tr key={name} data-testid="channel-row" data-channel={name} data-type={type} data-bad={bad ? 'yes' : 'no'}>
                <td className="pr-3 font-mono">{name}</td>
                <td className="pr-3">
                  <select aria-label={`Type of ${name}`} value={type} onChange={(e) => onChange({ types: typesWith(recording, conditioning, name, e.target.value as ChannelType) })}>
                    {CHANNEL_TYPES.map((t) => (
                      <option key={t} value={t}>
                        {TYPE_WORDS[t]}
                        {t === fromFile ? ' (from the file)' : ''}
                      </option>
                    ))}
                  </select>
                </td>
                <td className="pr-3 font-mono">{unit}</td>
                <td>
                  <input type="checkbox" aria-label={`${name} is bad`} checked={bad} onChange={(e) => onChange({ bad: badWith(conditioning, name, e.target.checked) })} />
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <ReferencePanel electrodes={electrodes} intracranial={intracranial} reference={conditioning.reference} onChange={(reference) => onChange({ reference })} />
      <FiltersPanel sampleRateHz={recording.sampleRateHz} filters={conditioning.filters} onChange={(filters) => onChange({ filters })} />
      {problem !== null && (
        <p className="notice notice-warn text-sm" role="alert" data-testid="channels-problem">
          These settings cannot be applied: {problem}
        </p>
      )}
    </div>
  );
}
