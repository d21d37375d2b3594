import { useRef, useState, type PointerEvent } from 'react';
import type { MapGeometry } from '../explorer/MapPanel';
import { notesOnMap, pinBox, regionRanges } from '../../lib/client/workspace/note-pins';
import { startPin, useReviewLink } from '../../lib/client/workspace/review';
import { selectActive, useResultsStore } from '../../lib/client/workspace/results';
import { useWorkspace } from '../../lib/client/workspace/store';

const NO_GROUPS: Readonly<Record<string, readonly string[]>> = {};

/**
 * The pins of the linked analysis session's notes over one map (drawn through MapPanel's `overlay`), and, while
 * "Pin a note" is on, the layer that takes a dragged rectangle or a click and starts a note anchored there.
 * Pins never take the pointer: the cursor readout and the baseline band work through them.
 */
export default function MapPins({ geometry, testId }: { geometry: MapGeometry; testId: string }) {
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
            <span className={`absolute -top-5 -left-0.5 rounded-sm px-1 font-mono text-2xs leading-4 ${older ? 'bg-coral-deep text-sand' : 'bg-ink text-sand'}`}>
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
          aria-hidden
          className="absolute cursor-crosshair"
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
        </div>
      )}
    </>
  );
}
