/** An axis-aligned box by its centre and size, in any one unit. */
export interface LabelBox {
  x: number;
  y: number;
  width: number;
  height: number;
}

/** Whether two boxes overlap by more than `gap` allows (touching edges do not count). */
export function boxesIntersect(a: LabelBox, b: LabelBox, gap = 0): boolean {
  return Math.abs(a.x - b.x) * 2 < a.width + b.width + 2 * gap - 1e-9 && Math.abs(a.y - b.y) * 2 < a.height + b.height + 2 * gap - 1e-9;
}

/**
 * Moves `labels` (copies; the input is not changed) until no two of them intersect and, as far as that allows, none
 * covers an `obstacle` (an electrode dot). Each pass pushes every intersecting pair apart along the axis of least
 * overlap, half each (an obstacle does not move, so the label takes the whole push); passes repeat until nothing
 * intersects. Ties are broken by index, so the result is deterministic. A last guard stacks any pair still
 * intersecting after `passes` (never seen in the tests) so the promise "no two labels intersect" always holds.
 */
export function placeLabels(labels: readonly LabelBox[], obstacles: readonly LabelBox[] = [], { gap = 0.5, passes = 400 }: { gap?: number; passes?: number } = {}): LabelBox[] {
  const out = labels.map((l) => ({ ...l }));
  const push = (a: LabelBox, b: LabelBox, share: number, i: number, j: number) => {
    const ox = (a.width + b.width) / 2 + gap - Math.abs(a.x - b.x);
    const oy = (a.height + b.height) / 2 + gap - Math.abs(a.y - b.y);
    if (ox <= 0 || oy <= 0) return false;
    // Along the cheaper axis; a coincident pair goes apart sideways, the lower index to the left.
    if (ox * a.height < oy * a.width) {
      const dir = a.x < b.x || (a.x === b.x && i < j) ? -1 : 1;
      a.x += dir * (ox + 1e-6) * share;
      if (share < 1) b.x -= dir * (ox + 1e-6) * (1 - share);
    } else {
      const dir = a.y < b.y || (a.y === b.y && i < j) ? -1 : 1;
      a.y += dir * (oy + 1e-6) * share;
      if (share < 1) b.y -= dir * (oy + 1e-6) * (1 - share);
    }
    return true;
  };
  for (let pass = 0; pass < passes; pass++) {
    let moved = false;
    for (let i = 0; i < out.length; i++) {
      for (let j = i + 1; j < out.length; j++) if (push(out[i], out[j], 0.5, i, j)) moved = true;
      // Obstacles only in the first half of the passes: labels must end apart even where dots are crowded.
      if (pass < passes / 2) for (const o of obstacles) if (push(out[i], { ...o }, 1, i, -1)) moved = true;
    }
    if (!moved) return out;
  }
  // Guard: anything still intersecting goes below everything else, one row per label.
  let bottom = Math.max(...out.map((l) => l.y + l.height / 2));
  for (let i = 0; i < out.length; i++) {
    if (out.some((o, j) => j !== i && boxesIntersect(out[i], o))) {
      out[i].y = bottom + gap + out[i].height / 2;
      bottom = out[i].y + out[i].height / 2;
    }
  }
  return out;
}
