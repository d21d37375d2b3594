import { lazy, Suspense, useEffect, useRef, type ComponentType, type KeyboardEvent } from 'react';
import { screens, type ScreenName, type WorkspaceProps } from './types';
import SourceScreen from './SourceScreen';
import RecipeScreen from './RecipeScreen';
import OutboundScreen from './OutboundScreen';
import SignInWatch from './SignInWatch';
import MemoryBar from './MemoryBar';
import SessionBar from '../review/SessionBar';
import { bindAccount } from '../../lib/client/workspace';
import { useScreen } from '../../lib/client/workspace/navigation';

// The plot-heavy screens are chunks of their own, fetched after the island starts: the Source screen is usable
// before the plotting code has arrived.
const MapsScreen = lazy(() => import('./MapsScreen'));
const SpectrumScreen = lazy(() => import('./SpectrumScreen'));
const BandsScreen = lazy(() => import('./BandsScreen'));
const SlopeCheckScreen = lazy(() => import('./SlopeCheckScreen'));

// Browser test hooks (?testhooks) exist only in the demo/test build: behind this constant the production bundler
// drops the import and with it the hooks and the demo generator (tests/browser/production.test.ts checks the chunks).
if (import.meta.env.TIDEMARK_DEMO) void import('../explorer/test-hooks').then((m) => m.installTestHooks());

// Element ids take no spaces (aria-controls and aria-labelledby read a space as a list): "Slope check" → "Slope-check".
const idOf = (name: ScreenName): string => name.replace(/\s+/g, '-');

const components: Record<ScreenName, ComponentType<WorkspaceProps>> = {
  Source: SourceScreen,
  Recipe: RecipeScreen,
  Maps: MapsScreen,
  Spectrum: SpectrumScreen,
  Bands: BandsScreen,
  'Slope check': SlopeCheckScreen,
  Outbound: OutboundScreen,
};

/** The analysis workspace: one island, one tab per screen. Screens read the workspace controller's state and paint. */
export default function Workspace(props: WorkspaceProps) {
  // In the controller, so finishing a run on the Recipe screen can move on to Maps.
  const active = useScreen((s) => s.active) as ScreenName;
  const setActive = useScreen((s) => s.show);
  const tabs = useRef<Record<string, HTMLButtonElement | null>>({});
  // The account's own saved workspaces (IndexedDB per account), looked up whenever a recording is opened.
  useEffect(() => bindAccount(props.userId), [props.userId]);
  // WAI-ARIA Authoring Practices, tabs pattern: arrows move between tabs, Home/End go to the first/last.
  const onKeyDown = (event: KeyboardEvent<HTMLDivElement>) => {
    const i = screens.indexOf(active);
    const next =
      event.key === 'ArrowRight' ? screens[(i + 1) % screens.length]
      : event.key === 'ArrowLeft' ? screens[(i - 1 + screens.length) % screens.length]
      : event.key === 'Home' ? screens[0]
      : event.key === 'End' ? screens[screens.length - 1]
      : null;
    if (next === null) return;
    event.preventDefault();
    setActive(next);
    tabs.current[next]?.focus();
  };
  return (
    <div className="mt-4">
      <SignInWatch />
      <MemoryBar />
      <SessionBar userId={props.userId} team={props.team} study={props.study} />
      <div role="tablist" aria-label="Workspace screens" className="flex flex-wrap gap-1 border-b border-shell" onKeyDown={onKeyDown}>
        {screens.map((name) => (
          <button
            key={name}
            type="button"
            role="tab"
            id={`tab-${idOf(name)}`}
            ref={(el) => {
              tabs.current[name] = el;
            }}
            aria-selected={active === name}
            tabIndex={active === name ? 0 : -1}
            aria-controls={`panel-${idOf(name)}`}
            className={`px-4 py-2 text-sm font-semibold ${active === name ? 'border-b-2 border-kelp text-ink' : 'text-ink-soft hover:text-ink'}`}
            onClick={() => setActive(name)}
          >
            {name}
          </button>
        ))}
      </div>
      {screens.map((name) => {
        const Screen = components[name];
        // Screens stay mounted so switching tabs keeps their state and any running work.
        return (
          <section key={name} role="tabpanel" id={`panel-${idOf(name)}`} aria-labelledby={`tab-${idOf(name)}`} hidden={active !== name} className="py-6">
            <Suspense fallback={<p className="text-sm text-ink-soft" data-testid="screen-loading">Loading the {name} screen…</p>}>
              <Screen {...props} />
            </Suspense>
          </section>
        );
      })}
    </div>
  );
}
