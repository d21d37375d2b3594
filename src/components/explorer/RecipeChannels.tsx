interface Props {
  /** The recipe's channels; empty means every brain channel. */
  chosen: string[];
  /** Channels a recipe can name (the recording as conditioned), and the brain ones among them. */
  candidates: string[];
  brain: string[];
  error: string | null;
  onChoose: (channels: string[]) => void;
}

/** The Recipe screen's channel choice: all brain channels, or the ones ticked. */
export default function RecipeChannels({ chosen, candidates, brain, error, onChoose }: Props) {
  const allChannels = chosen.length === 0;
  return (
    <fieldset className="card flex flex-col gap-2 p-3">
      <legend className="px-1 text-sm font-semibold">Channels</legend>
      <label className="flex items-center gap-1 text-sm">
        <input type="checkbox" checked={allChannels} onChange={() => onChoose(allChannels ? brain.slice(0, 1) : [])} data-testid="recipe-all-channels" />
        all {brain.length} brain channels (EEG, MEG, intracranial; types and bad channels on the Source screen)
      </label>
      <div className="flex flex-wrap gap-x-3 gap-y-1">
        {candidates.map((name) => {
          const on = allChannels ? brain.includes(name) : chosen.includes(name);
          return (
            <label key={name} className="flex items-center gap-1 font-mono text-sm">
              <input
                type="checkbox"
                checked={on}
                data-testid={`recipe-channel-${name}`}
                onChange={() => {
                  const current = allChannels ? brain : chosen;
                  const next = on ? current.filter((n) => n !== name) : candidates.filter((n) => n === name || current.includes(n));
                  onChoose(next.length === brain.length && next.every((n) => brain.includes(n)) ? [] : next);
                }}
              />
              {name}
            </label>
          );
        })}
      </div>
      {!allChannels && chosen.length === 0 && <p className="text-sm text-coral-deep">Choose at least one channel.</p>}
      {error && (
        <p className="text-sm text-coral-deep" role="alert">
          channels {error}
        </p>
      )}
    </fieldset>
  );
}
