/**
 * Point labels that do not overlap: a greedy placement in screen pixels. Pure, deterministic
 * (no Date, no random numbers; ties break by the order of the candidates), so the same points
 * give the same picture on every device.
 *
 * Each label is tried at offsets around its point, nearest ring first (eight directions, the
 * upper right first), then on rings further out. A candidate is refused when its box leaves the
 * plot, meets a label placed before it, or covers a point mark; among the rest the cheapest wins:
 * distance from the point, plus a penalty for every curve segment (the saturation dome, the
 * cycle's lines) the box crosses. A label moved past the first ring gets a leader line to its
 * point. A label that fits nowhere is left out (`placed: false`) rather than drawn over another.
 */

export interface Box {
  x: number;
  y: number;
  w: number;
  h: number;
}

export interface LabelRequest {
  id: string;
  /** the point, px */
  x: number;
  y: number;
  /** the label box, px */
  w: number;
  h: number;
  /** radius of the point's mark, px */
  r?: number;
}

export interface Segment {
  x1: number;
  y1: number;
  x2: number;
  y2: number;
}

export interface Mark {
  x: number;
  y: number;
  r: number;
}

export interface PlacementOptions {
  /** the area labels must stay in */
  bounds: Box;
  /** lines labels should rather not cross */
  segments?: Segment[];
  /** point marks (of labelled points and others) no label may cover */
  marks?: Mark[];
  /** gap between a mark and its label, px (default 3) */
  gap?: number;
  /** rings tried beyond the first (default 5) */
  rings?: number;
  /** cost of crossing one segment, in px of distance (default 12) */
  crossingCost?: number;
}

export interface PlacedLabel {
  id: string;
  placed: boolean;
  /** the label box (meaningless when not placed) */
  box: Box;
  /** the text's anchor: its left end, baseline-centred in the box (y is the box's vertical middle) */
  textX: number;
  textY: number;
  /** draw a line from the point to the box */
  leader: { x1: number; y1: number; x2: number; y2: number } | null;
}

/** Directions tried on each ring: upper right first (the usual place of a point label), then round the clock. */
const DIRECTIONS: [number, number][] = [
  [1, -1],
  [1, 0],
  [1, 1],
  [0, -1],
  [0, 1],
  [-1, -1],
  [-1, 0],
  [-1, 1],
];

/** Do two boxes share any area (touching edges do not count)? */
export function boxesIntersect(a: Box, b: Box): boolean {
  return a.x < b.x + b.w && b.x < a.x + a.w && a.y < b.y + b.h && b.y < a.y + a.h;
}

/** Does a circle reach into a box? */
export function circleInBox(c: Mark, b: Box): boolean {
  const nx = Math.max(b.x, Math.min(c.x, b.x + b.w));
  const ny = Math.max(b.y, Math.min(c.y, b.y + b.h));
  return (c.x - nx) ** 2 + (c.y - ny) ** 2 < c.r * c.r;
}

function inside(b: Box, outer: Box): boolean {
  return b.x >= outer.x && b.y >= outer.y && b.x + b.w <= outer.x + outer.w && b.y + b.h <= outer.y + outer.h;
}

/** Does a segment cross or enter a box (Liang–Barsky clipping)? */
export function segmentHitsBox(s: Segment, b: Box): boolean {
  const dx = s.x2 - s.x1;
  const dy = s.y2 - s.y1;
  let t0 = 0;
  let t1 = 1;
  const edges: [number, number][] = [
    [-dx, s.x1 - b.x],
    [dx, b.x + b.w - s.x1],
    [-dy, s.y1 - b.y],
    [dy, b.y + b.h - s.y1],
  ];
  for (const [p, q] of edges) {
    if (p === 0) {
      if (q < 0) return false;
      continue;
    }
    const t = q / p;
    if (p < 0) {
      if (t > t1) return false;
      if (t > t0) t0 = t;
    } else {
      if (t < t0) return false;
      if (t < t1) t1 = t;
    }
  }
  return t0 <= t1;
}

/** The box of a label put in direction (dx, dy) at `dist` px beyond the mark. */
function candidate(l: LabelRequest, dx: number, dy: number, dist: number): Box {
  const cx = dx > 0 ? l.x + dist : dx < 0 ? l.x - dist - l.w : l.x - l.w / 2;
  const cy = dy > 0 ? l.y + dist : dy < 0 ? l.y - dist - l.h : l.y - l.h / 2;
  return { x: cx, y: cy, w: l.w, h: l.h };
}

function check(label: string, field: string, v: number): void {
  if (!Number.isFinite(v)) throw new RangeError(`label ${label}: ${field} must be a finite number of px, got ${v}`);
}

export function placeLabels(labels: LabelRequest[], options: PlacementOptions): PlacedLabel[] {
  const gap = options.gap ?? 3;
  const rings = options.rings ?? 5;
  const crossingCost = options.crossingCost ?? 12;
  const segments = options.segments ?? [];
  const marks = options.marks ?? [];
  for (const l of labels) {
    for (const k of ['x', 'y', 'w', 'h'] as const) check(l.id, k, l[k]);
    if (l.w <= 0 || l.h <= 0) throw new RangeError(`label ${l.id}: w and h must be positive px, got ${l.w} × ${l.h}`);
  }
  const taken: Box[] = [];
  return labels.map((l): PlacedLabel => {
    const r = l.r ?? 0;
    const first = r + gap;
    const step = Math.max(l.h, 8);
    let found: { box: Box; cost: number; ring: number } | null = null;
    for (let ring = 0; ring <= rings; ring++) {
      const dist = first + ring * step;
      for (const [order, [dx, dy]] of DIRECTIONS.entries()) {
        const box = candidate(l, dx, dy, dist);
        if (!inside(box, options.bounds)) continue;
        if (taken.some((t) => boxesIntersect(t, box))) continue;
        if (marks.some((m) => circleInBox(m, box))) continue;
        const crossings = segments.reduce((n, s) => n + (segmentHitsBox(s, box) ? 1 : 0), 0);
        // order breaks ties in favour of the earlier direction
        const cost = dist + crossings * crossingCost + order * 0.01;
        if (!found || cost < found.cost) found = { box, cost, ring };
      }
      // every spot further out costs at least its distance: stop when none can beat the best
      if (found && found.cost <= first + (ring + 1) * step) break;
    }
    if (!found)
      return { id: l.id, placed: false, box: { x: l.x, y: l.y, w: 0, h: 0 }, textX: l.x, textY: l.y, leader: null };
    taken.push(found.box);
    const b = found.box;
    let leader: PlacedLabel['leader'] = null;
    if (found.ring > 0) {
      // from the mark's edge to the nearest point of the box
      const nx = Math.max(b.x, Math.min(l.x, b.x + b.w));
      const ny = Math.max(b.y, Math.min(l.y, b.y + b.h));
      const d = Math.hypot(nx - l.x, ny - l.y) || 1;
      leader = { x1: l.x + ((nx - l.x) / d) * r, y1: l.y + ((ny - l.y) / d) * r, x2: nx, y2: ny };
    }
    return { id: l.id, placed: true, box: b, textX: b.x, textY: b.y + b.h / 2, leader };
  });
}

/** A label's width in px for a font of `fontSize` (average advance of Noto Sans ≈ 0.56 em; common practice estimate). */
export const labelWidth = (text: string, fontSize: number): number => Math.ceil(text.length * fontSize * 0.56) + 2;
