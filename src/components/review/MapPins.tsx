import { useRef, useState, type KeyboardEvent, type PointerEvent } from 'react';
import type { MapGeometry } from '../explorer/MapPanel';
import { cellRanges, describeAnchor, notesOnMap, pinBox, regionRanges } from '../../lib/client/workspace/note-pins';
import { setPinMode, startPin, useReviewLink } from '../../lib/client/workspace/review';
import { selectActive, useResultsStore } from '../../lib/client/workspace/results';
import { useWorkspace } from '../../lib/client/workspace/store';

const NO_GROUPS: Readonly<Record<string, readonly string[]>> = {};

/**
 * The pins of the linked analysis session's notes over one map (drawn through MapPanel's `overlay`), and, while
 * "Pin a note" is on, the layer that takes a dragged rectangle or a click and starts a note anchored there.
 * Pins never take the pointer: the cursor readout and the baseline band work through them. With `keyboard` (one
 * panel only, so there is one tab stop), the layer also takes the keyboard: arrows move (about 1/60 of the epoch in
 * time, one row in frequency; Alt one sample), Shift+arrows widen the region, Enter pins it, Escape stops pinning.
 */
export default function MapPins({ geometry, testId, keyboard = false }: { geometry: MapGeometry; testId: string; keyboard?: boolean }) {
  const { layout, scales, spec } = geometry;
  const session = useReviewLink((s) => s.session);
  const phase = useReviewLink((s) => s.match.phase);
  const notes = useReviewLink((s) => s.notes);
  const selectedId = useReviewLink((s) => s.selectedNoteId);
  const pending = useReviewLink((s) => s.pending);
  const pinMode = useReviewLink((s) => s.pinMode);
  const channel = useWorkspace((s) => s.channel);
  const condition = useWorkspace((s) => s.condition);
  const compareTo = useWorkspace((s) => s.compareTo);
  const groups = useResultsStore((s) => selectActive(s)?.recipe.channelGroups ?? NO_GROUPS);
  const [band, setBand] = useState<{ x0: number; y0: number; x1: number; y1: number } | null>(null);
  /** Keyboard region: a fixed corner (t0, f0) and a moving one (t1, f1), grid indices. */
  const [keys, setKeys] = useState<{ t0: number; f0: number; t1: number; f1: number } | null>(null);
  const layer = useRef<HTMLDivElement>(null);
  if (session === null || (phase !== 'ready' && phase !== 'failed')) return null;

  const shown = notesOnMap(notes, channel, condition, groups);
  const current = session.currentVersion;
  const at = (e: PointerEvent<HTMLDivElement>) => {
    const r = layer.current!.getBoundingClientRect();
    return { x: e.clientX - r.left + layout.left, y: e.clientY - r.top + layout.top };
  };
  const canDraw = pinMode && compareTo === null && channel !== null && condition !== null;
  const finish = (e: PointerEvent<HTMLDivElement>) => {
    if (band === null) return;
    const p = at(e);
    const region = { ...band, x1: p.x, y1: p.y };
    setBand(null);
    const { timeS, frequencyHz } = regionRanges(region, scales, spec);
    startPin({ channel: channel!, condition: condition!, timeS, frequencyHz });
  };
  const nt = spec.times.length;
  const nf = spec.frequencies.length;
  const onKey = (e: KeyboardEvent<HTMLDivElement>) => {
    const k = keys ?? { t0: Math.floor(nt / 2), f0: Math.floor(nf / 2), t1: Math.floor(nt / 2), f1: Math.floor(nf / 2) };
    if (e.key === 'Escape') return setPinMode(false);
    if (e.key === 'Enter' || e.key === ' ') {
      e.preventDefault();
      return startPin({ channel: channel!, condition: condition!, ...cellRanges(spec, k) });
    }
    const step: Record<string, [number, number]> = { ArrowLeft: [-1, 0], ArrowRight: [1, 0], ArrowUp: [0, 1], ArrowDown: [0, -1] };
    const move = step[e.key];
    if (move === undefined) return;
    e.preventDefault();
    // A time cell is one sample: a key moves about 1/60 of the epoch, Alt one sample.
    const t1 = Math.min(nt - 1, Math.max(0, k.t1 + move[0] * (e.altKey ? 1 : Math.max(1, Math.round(nt / 60)))));
    const f1 = Math.min(nf - 1, Math.max(0, k.f1 + move[1]));
    setKeys(e.shiftKey ? { ...k, t1, f1 } : { t0: t1, f0: f1, t1, f1 });
  };
  const keysBox = keys === null ? null : pinBox(cellRanges(spec, keys), scales);
  const pendingBox = pending !== null && pending.channel === channel && pending.condition === condition ? pinBox(pending, scales) : null;

  return (
    <>
      {shown.map((n) => {
        const box = pinBox(n.anchor!, scales);
        if (box === null) return null;
        const older = current !== null && n.recipeVersion !== null && n.recipeVersion < current;
        const selected = n.id === selectedId;
        const number = notes.filter((x) => x.parentId === null && x.anchor).findIndex((x) => x.id === n.id) + 1;
        return (
          <div
            key={n.id}
            aria-hidden
            data-testid={`${testId}-pin`}
            data-note={n.id}
            data-selected={selected ? 'yes' : 'no'}
            data-older={older ? 'yes' : 'no'}
            className={`pointer-events-none absolute ${older ? 'border-dashed border-coral-deep' : 'border-solid border-ink'} ${selected ? 'border-[3px] bg-foam/25 shadow-[0_0_0_2px_var(--color-sand)]' : 'border-2'} ${n.resolvedAt ? 'opacity-50' : ''}`}
            style={{ left: box.left, top: box.top, width: Math.max(6, box.width), height: Math.max(6, box.height) }}
          >
            <span className={`absolute -top-5 -left-0.5 rounded-sm px-1 font-mono text-2xs leading-4 whitespace-nowrap ${older ? 'bg-coral-deep text-sand' : 'bg-ink text-sand'}`}>
              {number}
              {older ? ` · v${n.recipeVersion}` : ''}
            </span>
          </div>
        );
      })}
      {pendingBox !== null && (
        <div aria-hidden data-testid={`${testId}-pending-pin`} className="pointer-events-none absolute border-2 border-dotted border-kelp-deep bg-kelp/15" style={{ left: pendingBox.left, top: pendingBox.top, width: Math.max(6, pendingBox.width), height: Math.max(6, pendingBox.height) }} />
      )}
      {canDraw && (
        <div
          ref={layer}
          data-testid={`${testId}-pin-layer`}
          {...(keyboard
            ? { tabIndex: 0, role: 'application', 'aria-roledescription': 'region picker', 'aria-label': `Pin a note on ${channel} · ${condition}: arrow keys move, Shift and arrows widen the region, Alt for one sample, Enter pins it, Escape stops` }
            : { 'aria-hidden': true })}
          onKeyDown={keyboard ? onKey : undefined}
          onFocus={() => keyboard && keys === null && setKeys({ t0: Math.floor(nt / 2), f0: Math.floor(nf / 2), t1: Math.floor(nt / 2), f1: Math.floor(nf / 2) })}
          onBlur={() => setKeys(null)}
          className="absolute cursor-crosshair focus-visible:outline-2 focus-visible:outline-kelp"
          style={{ left: layout.left, top: layout.top, width: layout.plotWidth, height: layout.plotHeight, touchAction: 'none' }}
          onPointerDown={(e) => {
            e.preventDefault();
            e.currentTarget.setPointerCapture(e.pointerId);
            const p = at(e);
            setBand({ x0: p.x, y0: p.y, x1: p.x, y1: p.y });
          }}
          onPointerMove={(e) => {
            if (band === null) return;
            const p = at(e);
            setBand({ ...band, x1: p.x, y1: p.y });
          }}
          onPointerUp={finish}
          onPointerCancel={() => setBand(null)}
        >
          {band !== null && (
            <div
              className="pointer-events-none absolute border-2 border-dashed border-kelp-deep bg-kelp/10"
              style={{ left: Math.min(band.x0, band.x1) - layout.left, top: Math.min(band.y0, band.y1) - layout.top, width: Math.abs(band.x1 - band.x0), height: Math.abs(band.y1 - band.y0) }}
            />
          )}
          {keysBox !== null && (
            <div
              data-testid={`${testId}-pin-keys`}
              className="pointer-events-none absolute border-2 border-dashed border-kelp-deep bg-kelp/10"
              style={{ left: keysBox.left - layout.left, top: keysBox.top - layout.top, width: Math.max(4, keysBox.width), height: Math.max(4, keysBox.height) }}
            />
          )}
          {keyboard && keys !== null && (
            <span className="sr-only" aria-live="polite">
              {describeAnchor(cellRanges(spec, keys))}
            </span>
          )}
        </div>
      )}
    </>
  );
}
