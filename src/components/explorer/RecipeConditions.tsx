import { conditionsToggled, keptByCondition } from '../../lib/client/workspace/recipe-fields';
import type { Condition, EpochDecision } from '../../lib/client/workspace/source-rules';

interface Props {
  conditions: Condition[];
  /** The recipe's conditions; empty means every condition. */
  chosen: string[];
  decisions: EpochDecision[];
  error: string | null;
  onChoose: (conditions: string[]) => void;
}

/** The Recipe screen's condition choice: every condition defined on the Source screen, with its kept epochs. */
export default function RecipeConditions({ conditions, chosen, decisions, error, onChoose }: Props) {
  const names = conditions.map((c) => c.name);
  const kept = keptByCondition(decisions);
  return (
    <>
      <div className="flex flex-wrap gap-3">
        {conditions.map((c) => (
          <label key={c.name} className="flex items-center gap-1 text-sm">
            <input type="checkbox" checked={chosen.length === 0 || chosen.includes(c.name)} onChange={() => onChoose(conditionsToggled(names, chosen, c.name))} />
            {c.name} <span className="text-ink-soft">({kept.get(c.name) ?? 0} kept)</span>
          </label>
        ))}
        {conditions.length === 0 && <span className="text-sm text-coral-deep">No conditions defined yet.</span>}
      </div>
      {error && (
        <p className="text-sm text-coral-deep" role="alert">
          {error}
        </p>
      )}
    </>
  );
}
