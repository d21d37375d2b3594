import { useEffect, useState } from 'react';

export interface GroupRow {
  name: string;
  channels: string[];
}

interface RecipeGroupsProps {
  /** The recipe's groups, or null while the defaults apply. */
  groups: GroupRow[] | null;
  /** The default regions among the analysed channels (shown while `groups` is null). */
  defaults: GroupRow[];
  /** The recipe check's problem with `channelGroups`, naming the group and place. */
  error: string | null;
  onGroups: (groups: GroupRow[] | null) => void;
}

const parseChannels = (text: string) => text.split(/[,\s]+/).filter((c) => c !== '');

/** One channel list as typed: kept until it parses to something else, so "Fz, " can be typed on. */
function ChannelsInput({ value, onValue, label, testId }: { value: string[]; onValue: (v: string[]) => void; label: string; testId: string }) {
  const [text, setText] = useState(value.join(', '));
  useEffect(() => {
    if (parseChannels(text).join(',') !== value.join(',')) setText(value.join(', '));
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [value]);
  return (
    <input
      type="text"
      aria-label={label}
      className="min-w-48 flex-1 rounded-sm border border-shell bg-foam px-2 py-1 font-mono text-sm text-ink"
      value={text}
      data-testid={testId}
      onChange={(e) => {
        setText(e.target.value);
        onValue(parseChannels(e.target.value));
      }}
    />
  );
}

/** Problems a group list has before the recipe check sees it: empty and repeated names. */
export function groupProblems(groups: GroupRow[]): string[] {
  const out: string[] = [];
  groups.forEach((g, i) => {
    if (g.name.trim() === '') out.push(`group ${i + 1} has no name`);
    else if (groups.findIndex((x) => x.name.trim() === g.name.trim()) !== i) out.push(`group ${i + 1} repeats the name "${g.name.trim()}"`);
    if (g.channels.length === 0) out.push(`group "${g.name.trim() || i + 1}" lists no channel`);
  });
  return out;
}

/** The Recipe screen's channel groups: named regions whose maps the Maps screen can average (recipe `channelGroups`). */
export default function RecipeGroups({ groups, defaults, error, onGroups }: RecipeGroupsProps) {
  const rows = groups ?? defaults;
  const set = (i: number, patch: Partial<GroupRow>) => onGroups(rows.map((g, k) => (k === i ? { ...g, ...patch } : g)));
  const problems = groups === null ? [] : groupProblems(groups);
  return (
    <fieldset className="card flex flex-col gap-2 p-3" data-testid="recipe-groups">
      <legend className="px-1 text-sm font-semibold">Channel groups</legend>
      <p className="text-xs text-ink-soft">
        {groups === null
          ? 'The default regions from the 10-20 names of the analysed channels. Edit a row to write your own groups into the recipe.'
          : 'Written into the recipe as channelGroups. A group map on the Maps screen is the mean of its channels’ normalized maps.'}
      </p>
      {rows.length === 0 && <p className="text-sm text-ink-soft">No default region matches these channel names; add a group.</p>}
      {rows.map((g, i) => (
        <div key={i} className="flex flex-wrap items-center gap-2" data-testid="recipe-group">
          <input
            type="text"
            aria-label={`Name of group ${i + 1}`}
            className="w-44 rounded-sm border border-shell bg-foam px-2 py-1 text-sm text-ink"
            value={g.name}
            maxLength={40}
            data-testid="recipe-group-name"
            onChange={(e) => set(i, { name: e.target.value })}
          />
          <ChannelsInput value={g.channels} label={`Channels of group ${i + 1}, separated by commas`} testId="recipe-group-channels" onValue={(channels) => set(i, { channels })} />
          <button type="button" className="rounded-sm border border-shell px-2 py-1 text-sm text-ink hover:bg-sand-deep" onClick={() => onGroups(rows.filter((_, k) => k !== i))} aria-label={`Remove group ${g.name || i + 1}`}>
            Remove
          </button>
        </div>
      ))}
      <div className="flex flex-wrap gap-2">
        <button type="button" className="rounded-sm border border-kelp px-3 py-1 text-sm text-kelp-deep hover:bg-kelp-pale" data-testid="recipe-group-add" onClick={() => onGroups([...rows, { name: `group ${rows.length + 1}`, channels: [] }])}>
          Add group
        </button>
        {groups !== null && (
          <button type="button" className="rounded-sm border border-shell px-3 py-1 text-sm text-ink hover:bg-sand-deep" data-testid="recipe-group-defaults" onClick={() => onGroups(null)}>
            Back to the default regions
          </button>
        )}
      </div>
      {[...problems, ...(error !== null ? [error] : [])].map((p) => (
        <p key={p} className="text-sm text-coral-deep" role="alert" data-testid="recipe-groups-error">
          {p}
        </p>
      ))}
    </fieldset>
  );
}
