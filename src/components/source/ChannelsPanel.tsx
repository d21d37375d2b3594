import { useMemo } from 'react';
import { CHANNEL_TYPES, isBrainType, resolveChannels, type ChannelType } from '../../lib/analysis/channel-types';
import type { Recording } from '../../lib/analysis/recording';
import type { ConditioningSettings } from '../../lib/client/workspace/source-rules';
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
  const inferred = useMemo(() => resolveChannels(recording, undefined), [recording]);
  const typeOf = (name: string, c: number): ChannelType => conditioning.types[name] ?? inferred.types[c];
  const setType = (name: string, c: number, type: ChannelType) => {
    const types = { ...conditioning.types };
    if (type === inferred.types[c]) delete types[name];
    else types[name] = type;
    onChange({ types });
  };
  const setBad = (name: string, bad: boolean) => onChange({ bad: bad ? [...conditioning.bad.filter((n) => n !== name), name] : conditioning.bad.filter((n) => n !== name) });
  const analysed = recording.channelNames.filter((n, c) => isBrainType(typeOf(n, c)) && !conditioning.bad.includes(n)).length;
  const good = recording.channelNames.map((n, c) => ({ n, c })).filter(({ n }) => !conditioning.bad.includes(n));
  const electrodes = good.filter(({ c }) => inferred.units[c] === 'µV').map(({ n }) => n);
  const intracranial = good.filter(({ n, c }) => typeOf(n, c) === 'intracranial').map(({ n }) => n);
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
            {recording.channelNames.map((name, c) => {
              const type = typeOf(name, c);
              const bad = conditioning.bad.includes(name);
              return (
                <tr key={name} data-testid="channel-row" data-channel={name} data-type={type} data-bad={bad ? 'yes' : 'no'}>
                  <td className="pr-3 font-mono">{name}</td>
                  <td className="pr-3">
                    <select aria-label={`Type of ${name}`} value={type} onChange={(e) => setType(name, c, e.target.value as ChannelType)}>
                      {CHANNEL_TYPES.map((t) => (
                        <option key={t} value={t}>
                          {TYPE_WORDS[t]}
                          {t === inferred.types[c] ? ' (from the file)' : ''}
                        </option>
                      ))}
                    </select>
                  </td>
                  <td className="pr-3 font-mono">{inferred.units[c]}</td>
                  <td>
                    <input type="checkbox" aria-label={`${name} is bad`} checked={bad} onChange={(e) => setBad(name, e.target.checked)} />
                  </td>
                </tr>
              );
            })}
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
